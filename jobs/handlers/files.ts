// Artifact files of a handler: bytes the pipeline returned written beside its own files, and the CSV tables
// (per-order rows, fit points) every kind publishes for spreadsheet and pandas users.
import { readFile, writeFile } from "node:fs/promises";
import path from "node:path";
import type { ArtifactFile } from "@/jobs/handlers/types";
import { MAX_GEOJSON_BYTES } from "@/lib/vector/limits";
import { parseGeoJsonText } from "@/lib/vector/read-geojson";
import { VectorError } from "@/lib/vector/vector-error";
import { fitPointsCsv } from "@/lib/jobs/csv-tables";

export async function materialize(outDir: string, a: { name: string; mediaType: string; path?: string; bytes?: Uint8Array }): Promise<ArtifactFile> {
  if (a.path) return { name: a.name, mediaType: a.mediaType, path: a.path };
  const file = path.join(outDir, a.name);
  await writeFile(file, a.bytes ?? new Uint8Array());
  return { name: a.name, mediaType: a.mediaType, path: file };
}

export async function csvArtifact(outDir: string, name: string, text: string): Promise<ArtifactFile> {
  const file = path.join(outDir, name);
  await writeFile(file, text);
  return { name, mediaType: "text/csv; charset=utf-8", path: file };
}

/** fit-points.csv, when the summary holds any log–log fit. */
export async function fitPointsArtifact(outDir: string, summary: unknown): Promise<ArtifactFile[]> {
  const csv = fitPointsCsv(summary);
  return csv === null ? [] : [await csvArtifact(outDir, "fit-points.csv", csv)];
}

/** A GeoJSON dataset read as the vector pipelines take it (the text cap is the readers' own). */
export async function readGeoJsonDataset(file: string): Promise<unknown> {
  const text = await readFile(file, "utf8");
  if (text.length > MAX_GEOJSON_BYTES) throw new VectorError("file_too_large", `the GeoJSON text is over ${MAX_GEOJSON_BYTES} characters`);
  return parseGeoJsonText(text);
}
