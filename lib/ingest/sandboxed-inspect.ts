// Inspection of an uploaded file before it is accepted: the format is sniffed from its first bytes in the
// server, then the parsing runs in a killable child process (lib/ingest/sandbox.ts) under a heap limit, an
// RSS cap and a deadline, so a hostile file (IFD loop, bomb, absurd size) costs seconds, never the server.
import path from "node:path";
import type { InspectKind, InspectRequest, Inspection } from "@/lib/ingest/inspect-child";
import {
  InspectionFailedError, runInSandbox, SandboxSlots, type SandboxLimits, type SandboxOptions,
} from "@/lib/ingest/sandbox";
import { describeFormat, sniffFile, type SniffedFormat } from "@/lib/ingest/sniff-format";

export type { InspectKind, Inspection } from "@/lib/ingest/inspect-child";
export { InspectionBusyError, InspectionFailedError, InspectionMemoryError, InspectionTimeoutError } from "@/lib/ingest/sandbox";

/** The process's inspection slots: one child per core of the 2-core target machine, and a short queue
 *  (each waiting upload holds a client connection). Pass `sandbox.slots` to use others. */
export const INSPECTION_SLOTS = new SandboxSlots(2, 8);

/** The child entry, relative to the project root (tsx runs it from source; see runInSandbox). */
export const INSPECT_CHILD_ENTRY = "lib/ingest/inspect-child.ts";

const KIND_OF_FORMAT: Partial<Record<SniffedFormat, InspectKind>> = { tiff: "geotiff", bigtiff: "geotiff", json: "geojson", zip: "zip" };
const KIND_NAMES: Record<InspectKind, string> = { geotiff: "a GeoTIFF", geojson: "GeoJSON", zip: "a zipped Shapefile" };

export interface InspectUploadOptions {
  /** What the client said it sent (from Content-Type or the file name); checked against the bytes. */
  declaredKind?: InspectKind;
  /** Shown in error details. */
  filename?: string;
  epsg?: number;
  band?: number;
  cellBudget?: number;
  limits?: Partial<SandboxLimits>;
  sandbox?: SandboxOptions;
}

export interface UploadInspection {
  inspection: Inspection;
  format: SniffedFormat;
  elapsedMs: number;
  peakRssBytes: number;
}

/** Sniffs and inspects a staged file. Throws InspectionFailedError (code `unsupported_format`,
 *  `format_mismatch`, or the reader's own code such as `corrupt`, `too-large`, `not_lines`),
 *  InspectionTimeoutError or InspectionMemoryError. */
export async function inspectUpload(filePath: string, options: InspectUploadOptions = {}): Promise<UploadInspection> {
  const format = await sniffFile(filePath);
  const kind = KIND_OF_FORMAT[format];
  const named = options.filename ? `"${options.filename}" ` : "";
  if (options.declaredKind && options.declaredKind !== kind) {
    throw new InspectionFailedError("format_mismatch",
      `the file ${named}was sent as ${KIND_NAMES[options.declaredKind]} but its bytes are ${describeFormat(format)}`);
  }
  if (!kind) {
    throw new InspectionFailedError("unsupported_format",
      `the file ${named}is ${describeFormat(format)}; expected a GeoTIFF, GeoJSON or a zipped Shapefile`);
  }
  const request: InspectRequest = {
    kind, path: path.resolve(filePath), epsg: options.epsg, band: options.band, cellBudget: options.cellBudget,
  };
  const run = await runInSandbox<Inspection>(INSPECT_CHILD_ENTRY, request, options.limits, { slots: INSPECTION_SLOTS, keepSpare: true, ...options.sandbox });
  return { inspection: run.result, format, elapsedMs: run.elapsedMs, peakRssBytes: run.peakRssBytes };
}
