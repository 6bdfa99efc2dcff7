// Entry of the inspection child process (started by sandboxed-inspect.ts through lib/ingest/sandbox.ts): reads
// an uploaded file's metadata with the raster or vector readers, never its pixels, and answers once.
import { stat, readFile } from "node:fs/promises";
import { serveOneRequest } from "@/lib/ingest/sandbox-child";
import { summarizeLines, type LinesSummary } from "@/lib/ingest/summarize-lines";
import { inspectGeoTiff, type Georeference, type RasterInfo } from "@/lib/raster/read-geotiff";
import { MAX_GEOJSON_BYTES } from "@/lib/vector/limits";
import { parseGeoJsonText, readGeoJson, type VectorLines } from "@/lib/vector/read-geojson";
import { readShapefileZip } from "@/lib/vector/read-shapefile";
import { resolveLinesCrs } from "@/lib/vector/resolve-crs";
import { VectorError } from "@/lib/vector/vector-error";

export type InspectKind = "geotiff" | "geojson" | "zip";

export interface InspectRequest {
  kind: InspectKind;
  /** Absolute path of the staged upload. */
  path: string;
  /** CRS given by the client: supplies a missing one or overrides the file's. */
  epsg?: number;
  /** 1-based raster band. */
  band?: number;
  /** Most raster cells accepted. */
  cellBudget?: number;
}

export type Inspection =
  | { kind: "geotiff"; raster: RasterInfo & { georef: Georeference } }
  | { kind: "geojson" | "zip"; lines: LinesSummary };

async function readGeoJsonFile(path: string): Promise<VectorLines> {
  const { size } = await stat(path);
  if (size > MAX_GEOJSON_BYTES) {
    throw new VectorError("file_too_large", `the GeoJSON file is ${size} bytes; at most ${MAX_GEOJSON_BYTES} are accepted`);
  }
  return readGeoJson(parseGeoJsonText(await readFile(path, "utf8")));
}

async function inspect(request: InspectRequest): Promise<Inspection> {
  const { kind, path, epsg } = request;
  if (kind === "geotiff") {
    return { kind, raster: await inspectGeoTiff(path, { epsg, band: request.band, cellBudget: request.cellBudget }) };
  }
  const vector = kind === "geojson" ? await readGeoJsonFile(path) : await readShapefileZip(path);
  return { kind, lines: summarizeLines(vector, resolveLinesCrs(vector.crs, vector.lines, epsg)) };
}

serveOneRequest((request) => inspect(request as InspectRequest));
