// Shapefile reading after ESRI (1998), "ESRI Shapefile Technical Description" (shape types in the main
// file header), through the `shapefile` npm package; the .prj WKT is passed to proj4, which parses WKT.
import { open } from "shapefile";
import { linesFromFeatures, type ReadLimits, type VectorLines } from "./read-geojson";
import { safeUnzip, type UnzipCaps } from "./safe-unzip";
import { VectorError } from "./vector-error";

export interface ShapefileParts {
  shp: Uint8Array;
  dbf?: Uint8Array;
  /** contents of the .prj file (WKT) */
  prj?: string;
  /** contents of the .cpg file (dBASE character encoding) */
  cpg?: string;
}

const HEADER_BYTES = 100;
const FILE_CODE = 9994;
/** shape types of the main file header (ESRI 1998, Table 1) */
const LINE_TYPES = new Set([3, 13, 23]);
const SHAPE_NAMES: Record<number, string> = { 0: "null shapes", 1: "points", 5: "polygons", 8: "multipoints", 11: "points", 15: "polygons", 18: "multipoints", 21: "points", 25: "polygons", 28: "multipoints", 31: "multipatches" };

/** Reads the polylines of a Shapefile held in memory. A file of another shape type is refused at once. */
export async function readShapefile(parts: ShapefileParts, limits: Partial<ReadLimits> = {}): Promise<VectorLines> {
  const { shp } = parts;
  if (shp.length < HEADER_BYTES) throw new VectorError("bad_shapefile", `the .shp file is ${shp.length} bytes, shorter than its 100-byte header`);
  const view = new DataView(shp.buffer, shp.byteOffset, shp.byteLength);
  if (view.getInt32(0, false) !== FILE_CODE) throw new VectorError("bad_shapefile", "the .shp file does not start with the Shapefile file code 9994");
  const shapeType = view.getInt32(32, true);
  if (!LINE_TYPES.has(shapeType)) {
    const what = SHAPE_NAMES[shapeType] ?? `shape type ${shapeType}`;
    const hint = what === "polygons" ? "; convert the boundaries to lines first" : "";
    throw new VectorError("not_lines", `the Shapefile holds ${what} (shape type ${shapeType}), not lines: only PolyLine shapes are accepted${hint}`);
  }
  let source;
  try {
    source = await open(shp, parts.dbf ?? null, { encoding: parts.cpg?.trim() || "windows-1252" });
  } catch (e) {
    throw new VectorError("bad_shapefile", `the Shapefile cannot be read (${(e as Error).message})`);
  }
  const features: unknown[] = [];
  for (;;) {
    let next;
    try {
      next = await source.read();
    } catch (e) {
      throw new VectorError("bad_shapefile", `record ${features.length} cannot be read (${(e as Error).message})`);
    }
    if (next.done) break;
    features.push(next.value);
  }
  const crs = parts.prj && parts.prj.trim() ? { kind: "prj" as const, wkt: parts.prj.trim() } : { kind: "none" as const };
  return linesFromFeatures(features, crs, limits);
}

const SIDE_FILES = /\.(shp|dbf|prj|cpg)$/i;

/** Reads the one Shapefile inside a zip (a path or the bytes), unzipped through the caps of safeUnzip. */
export async function readShapefileZip(
  source: Buffer | string,
  limits: Partial<ReadLimits> = {},
  caps: Partial<UnzipCaps> = {},
): Promise<VectorLines> {
  const { files } = await safeUnzip(source, (name) => SIDE_FILES.test(name) && !name.split("/").some((p) => p.startsWith(".")), caps);
  const shpNames = [...files.keys()].filter((n) => /\.shp$/i.test(n)).sort();
  if (shpNames.length !== 1) {
    throw new VectorError("no_shapefile", shpNames.length === 0 ? "the zip holds no .shp file" : `the zip holds ${shpNames.length} .shp files (${shpNames.join(", ")}); one is expected`);
  }
  const stem = shpNames[0].slice(0, -4);
  const side = (ext: string): Buffer | undefined => {
    for (const [name, data] of files) if (name.slice(0, -4) === stem && name.slice(-4).toLowerCase() === ext) return data;
    return undefined;
  };
  return readShapefile(
    { shp: side(".shp")!, dbf: side(".dbf"), prj: side(".prj")?.toString("utf8"), cpg: side(".cpg")?.toString("utf8") },
    limits,
  );
}
