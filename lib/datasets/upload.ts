// POST /api/v1/datasets as a service: stream the file to a staged temp file (SHA-256 and byte count on the
// way, the size limit checked per chunk), inspect it in the sandboxed child, and only then store and record it.
// Every failure leaves nothing: the staged file is removed, no object is written, no row is inserted.
import path from "node:path";
import type { Db } from "@/db/client";
import type { DatasetRow } from "@/db/schema";
import { ApiError } from "@/lib/api/problem";
import type { Clock } from "@/lib/auth/clock";
import { acceptDataset, type Acting } from "@/lib/datasets/registry";
import { MEDIA_TYPE_OF_FORMAT, UploadRequestError, openUploadBody } from "@/lib/datasets/upload-body";
import {
  InspectionBusyError, InspectionFailedError, InspectionMemoryError, InspectionTimeoutError, inspectUpload, type Inspection,
} from "@/lib/ingest/sandboxed-inspect";
import { INSPECTION_SLOTS } from "@/lib/ingest/sandboxed-inspect";
import { runInSandbox } from "@/lib/ingest/sandbox";
import type { DecodeCheck, DecodeCheckRequest } from "@/lib/datasets/decode-check-child";
import { discardStaged, PayloadTooLargeError, stageToTempFile, type StagedFile } from "@/lib/ingest/stream-to-store";
import type { DatasetFormat } from "@/lib/jobs/kinds";
import type { ObjectStore } from "@/lib/storage";
import { UNCOMPRESSED } from "@/lib/raster/read-geotiff";

/** Seconds a client is told to wait when every inspection slot is taken. */
const BUSY_RETRY_AFTER_S = 5;
/** Multipart boundaries and small fields add to the file's size; this much over the limit is still read. */
const MULTIPART_OVERHEAD_BYTES = 64 * 1024;
const MAX_NAME_CHARS = 200;
/** Compressed rasters up to this many cells are decoded in full at upload (a few seconds at most), so a
 *  decompression bomb or a corrupt block is refused now; larger ones are checked block by block by the
 *  job's own bounded reader, and fail the job instead. Uncompressed blocks cannot inflate. */
export const DECODE_CHECK_MAX_CELLS = 64 * 1024 * 1024;
const DECODE_CHECK_ENTRY = "lib/datasets/decode-check-child.ts";

export interface UploadOptions {
  maxBytes: number;
  tempDir: string;
  filename?: string;
  epsg?: number;
}

/** The metadata kept on the dataset row (JSON: a NaN nodata is written "NaN"). */
export function datasetMetadata(inspection: Inspection, epsgGiven: number | undefined): Record<string, unknown> {
  if (inspection.kind === "geotiff") {
    const r = inspection.raster;
    return {
      kind: "raster",
      crs: { epsg: r.georef.crs.epsg, name: r.georef.crs.name, geographic: r.georef.crs.geographic },
      bboxLonLat: r.bboxLonLat,
      width: r.width, height: r.height, bands: r.bands,
      cellSizeM: r.cellSizeM,
      dataType: r.dataType,
      nodata: r.nodata === null ? null : Number.isNaN(r.nodata) ? "NaN" : r.nodata,
      compression: r.compression, tiled: r.tiled,
      epsgGiven: epsgGiven ?? null,
    };
  }
  const l = inspection.lines;
  return {
    kind: "lines",
    crs: l.crs, bboxLonLat: l.bboxLonLat,
    featureCount: l.featureCount, lineCount: l.lineCount, vertexCount: l.vertexCount, skipped: l.skipped,
    epsgGiven: epsgGiven ?? null,
  };
}

function problemOfInspection(e: unknown): ApiError | null {
  if (e instanceof InspectionFailedError) {
    return new ApiError("validation", `The file was refused: ${e.detail}`, { errors: [{ pointer: "/body", detail: e.code }] });
  }
  if (e instanceof InspectionTimeoutError || e instanceof InspectionMemoryError) {
    return new ApiError("validation", `The file was refused: ${e.message}`, { errors: [{ pointer: "/body", detail: e.code }] });
  }
  if (e instanceof InspectionBusyError) {
    return new ApiError("service-unavailable", e.message, { headers: { "retry-after": String(BUSY_RETRY_AFTER_S) } });
  }
  return null;
}

export async function uploadDataset(
  req: Request, db: Db, store: ObjectStore, clock: Clock, acting: Acting, o: UploadOptions,
): Promise<{ dataset: DatasetRow; created: boolean }> {
  let staged: StagedFile | undefined;
  let format: DatasetFormat | undefined;
  let filename: string | undefined;
  let epsg = o.epsg;
  try {
    const body = await openUploadBody(req, o.filename);
    filename = body.filename;
    format = body.declaredFormat;
    if (body.fields.epsg !== undefined && epsg === undefined) epsg = parseEpsg(body.fields.epsg);
    const declaredLength = body.multipart
      ? body.declaredLength !== undefined && body.declaredLength > o.maxBytes + MULTIPART_OVERHEAD_BYTES ? body.declaredLength : undefined
      : body.declaredLength;
    staged = await stageToTempFile(body.file, o.tempDir, { maxBytes: o.maxBytes, declaredLength, signal: req.signal });
  } catch (e) {
    if (e instanceof PayloadTooLargeError) throw new ApiError("payload-too-large", `Uploads are limited to ${o.maxBytes} bytes.`);
    if (e instanceof UploadRequestError) throw new ApiError(e.kind, e.message);
    throw e;
  }
  if (staged.size === 0) {
    await discardStaged(staged);
    throw new ApiError("bad-request", "The body is empty; send the file as the body.");
  }
  let inspection: Inspection;
  let decoded: DecodeCheck | null = null;
  try {
    inspection = (await inspectUpload(staged.path, { declaredKind: format, filename, epsg })).inspection;
    if (inspection.kind === "geotiff" && inspection.raster.compression !== UNCOMPRESSED
      && inspection.raster.width * inspection.raster.height <= DECODE_CHECK_MAX_CELLS) {
      const request: DecodeCheckRequest = { path: path.resolve(staged.path), epsg, cellBudget: DECODE_CHECK_MAX_CELLS };
      decoded = (await runInSandbox<DecodeCheck>(DECODE_CHECK_ENTRY, request, {}, { slots: INSPECTION_SLOTS })).result;
    }
  } catch (e) {
    await discardStaged(staged);
    throw problemOfInspection(e) ?? e;
  }
  const actual: DatasetFormat = inspection.kind;
  const name = (filename ?? `upload-${staged.sha256.slice(0, 12)}.${actual === "geotiff" ? "tif" : actual}`).slice(0, MAX_NAME_CHARS);
  return acceptDataset(db, store, clock, acting, staged, {
    name: path.basename(name), format: actual, mediaType: MEDIA_TYPE_OF_FORMAT[actual], metadata: { ...datasetMetadata(inspection, epsg), ...decoded },
  });
}

export function parseEpsg(v: string): number {
  const n = Number(v);
  if (!Number.isInteger(n) || n < 1024 || n > 999_999) {
    throw new ApiError("validation", "epsg must be an EPSG code", { errors: [{ pointer: "/epsg", detail: "must be an integer EPSG code" }] });
  }
  return n;
}
