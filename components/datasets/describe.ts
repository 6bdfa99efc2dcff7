// Dataset metadata (read by the server before the upload was accepted) in words for tables and the details view.
import type { DatasetBody } from "@/components/jobs/bodies";

export const FORMAT_LABELS: Record<DatasetBody["format"], string> = {
  geotiff: "DEM (GeoTIFF)",
  geojson: "Lines (GeoJSON)",
  zip: "Lines (zipped shapefile)",
};

/** The Content-Type an upload is sent with, from the file name (the route also accepts the extension alone). */
export function uploadMediaType(filename: string): string | undefined {
  const ext = filename.toLowerCase().split(".").at(-1);
  if (ext === "tif" || ext === "tiff") return "image/tiff";
  if (ext === "geojson" || ext === "json") return "application/geo+json";
  if (ext === "zip") return "application/zip";
  return undefined;
}

const UNITS = ["B", "KiB", "MiB", "GiB", "TiB"];

export function formatBytes(bytes: number): string {
  let v = bytes, u = 0;
  while (v >= 1024 && u < UNITS.length - 1) {
    v /= 1024;
    u++;
  }
  return u === 0 ? `${bytes} B` : `${v.toFixed(v < 10 ? 2 : 1)} ${UNITS[u]}`;
}

interface Crs {
  epsg?: number | null;
  name?: string;
}

const record = (v: unknown): Record<string, unknown> => (typeof v === "object" && v !== null ? (v as Record<string, unknown>) : {});
const numbers = (v: unknown): number[] | undefined =>
  Array.isArray(v) && v.every((x) => typeof x === "number") ? (v as number[]) : undefined;

export function describeCrs(metadata: Record<string, unknown>): string {
  const crs = record(metadata.crs) as Crs;
  if (crs.epsg !== undefined && crs.epsg !== null) return `EPSG:${crs.epsg}`;
  return crs.name ?? "—";
}

export function crsName(metadata: Record<string, unknown>): string | undefined {
  return (record(metadata.crs) as Crs).name;
}

/** Cell size in metres ("30 m" or "92.6 × 68.4 m"); lines have none. */
export function describeCellSize(metadata: Record<string, unknown>): string {
  const c = numbers(metadata.cellSizeM);
  if (c === undefined || c.length < 2) return "—";
  const [x, y] = c.map((v) => (v >= 100 ? v.toFixed(0) : v.toPrecision(3)));
  return x === y ? `${x} m` : `${x} × ${y} m`;
}

/** [west, south, east, north] in degrees, 3 decimals (about 100 m), with hemispheres: the south-west and
 *  north-east corners, or null when the metadata has no box. */
export function describeBbox(metadata: Record<string, unknown>): { southWest: string; northEast: string } | null {
  const b = numbers(metadata.bboxLonLat);
  if (b === undefined || b.length !== 4) return null;
  const lon = (v: number) => `${Math.abs(v).toFixed(3)}°${v < 0 ? "W" : "E"}`;
  const lat = (v: number) => `${Math.abs(v).toFixed(3)}°${v < 0 ? "S" : "N"}`;
  return { southWest: `${lon(b[0])} ${lat(b[1])}`, northEast: `${lon(b[2])} ${lat(b[3])}` };
}

/** Grid size for rasters, counts for lines. */
export function describeExtent(metadata: Record<string, unknown>): string {
  if (typeof metadata.width === "number" && typeof metadata.height === "number") return `${metadata.width} × ${metadata.height} cells`;
  if (typeof metadata.lineCount === "number") return `${metadata.lineCount} lines`;
  return "—";
}

/** Every metadata member as label and text, for the details view. */
export function metadataRows(metadata: Record<string, unknown>): { label: string; value: string }[] {
  return Object.entries(metadata).map(([key, value]) => ({
    label: key,
    value: typeof value === "string" || typeof value === "number" || typeof value === "boolean" ? String(value) : JSON.stringify(value),
  }));
}
