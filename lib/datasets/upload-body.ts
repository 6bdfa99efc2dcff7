// The file part of an upload request, as a stream: the raw body (Content-Type image/tiff, application/geo+json or
// application/zip) or the first file of a multipart/form-data body (RFC 7578), parsed as it arrives by busboy.
// Nothing here buffers the file; the caller hashes, counts and stages it (lib/ingest/stream-to-store.ts).
import busboy from "busboy";
import { Readable } from "node:stream";
import type { ReadableStream as NodeWebStream } from "node:stream/web";
import type { DatasetFormat } from "@/lib/jobs/kinds";

/** A malformed or unusable upload request (→ 400/415 in the route). */
export class UploadRequestError extends Error {
  constructor(readonly kind: "bad-request" | "unsupported-media-type", message: string) {
    super(message);
    this.name = "UploadRequestError";
  }
}

export interface UploadBody {
  file: Readable;
  /** From the media type or, for application/octet-stream, the file name's extension. */
  declaredFormat: DatasetFormat | undefined;
  filename: string | undefined;
  /** Form fields that came before the file part (multipart only). */
  fields: Record<string, string>;
  /** For multipart, the whole body's length (boundaries included), else the file's. */
  declaredLength: number | undefined;
  multipart: boolean;
}

const MEDIA_FORMATS: Record<string, DatasetFormat> = {
  "image/tiff": "geotiff",
  "image/geotiff": "geotiff",
  "application/geo+json": "geojson",
  "application/json": "geojson",
  "application/zip": "zip",
  "application/x-zip-compressed": "zip",
};
const EXT_FORMATS: Record<string, DatasetFormat> = { tif: "geotiff", tiff: "geotiff", geojson: "geojson", json: "geojson", zip: "zip" };

/** Fields of a form read before the file: small, few. */
const MAX_FIELDS = 20;
const MAX_FIELD_BYTES = 1024;

export const mediaTypeOf = (contentType: string | null) => (contentType ?? "").split(";")[0].trim().toLowerCase();

export function formatOf(mediaType: string, filename: string | undefined): DatasetFormat | undefined {
  const byType = MEDIA_FORMATS[mediaType];
  if (byType) return byType;
  const ext = filename?.toLowerCase().split(".").at(-1);
  return ext ? EXT_FORMATS[ext] : undefined;
}

export const MEDIA_TYPE_OF_FORMAT: Record<DatasetFormat, string> = {
  geotiff: "image/tiff; application=geotiff",
  geojson: "application/geo+json",
  zip: "application/zip",
};

function declaredLengthOf(req: Request): number | undefined {
  const v = req.headers.get("content-length");
  if (v === null) return undefined;
  const n = Number(v);
  if (!Number.isSafeInteger(n) || n < 0) throw new UploadRequestError("bad-request", "Content-Length is not a byte count");
  return n;
}

/** Resolves once the file part starts (multipart) or at once (raw body). */
export async function openUploadBody(req: Request, filenameParam: string | undefined): Promise<UploadBody> {
  if (!req.body) throw new UploadRequestError("bad-request", "the request has no body; send the file as the body");
  const contentType = req.headers.get("content-type");
  const mediaType = mediaTypeOf(contentType);
  const declaredLength = declaredLengthOf(req);
  const source = Readable.fromWeb(req.body as unknown as NodeWebStream<Uint8Array>);
  if (mediaType !== "multipart/form-data") {
    const format = formatOf(mediaType, filenameParam);
    if (!format && mediaType !== "application/octet-stream") {
      source.destroy();
      throw new UploadRequestError("unsupported-media-type",
        `Content-Type ${mediaType || "(none)"} is not an upload type; send image/tiff, application/geo+json, application/zip or multipart/form-data`);
    }
    return { file: source, declaredFormat: format, filename: filenameParam, fields: {}, declaredLength, multipart: false };
  }
  return new Promise<UploadBody>((resolve, reject) => {
    let parser: busboy.Busboy;
    try {
      parser = busboy({ headers: { "content-type": contentType ?? "" }, limits: { files: 1, fields: MAX_FIELDS, fieldSize: MAX_FIELD_BYTES } });
    } catch (e) {
      source.destroy();
      return reject(new UploadRequestError("bad-request", `the multipart body cannot be read: ${(e as Error).message}`));
    }
    const fields: Record<string, string> = {};
    let started = false;
    parser.on("field", (name, value) => { fields[name] = value; });
    parser.on("file", (_name, file, info) => {
      started = true;
      const filename = filenameParam ?? info.filename;
      const format = formatOf(mediaTypeOf(info.mimeType), filename) ?? formatOf("", filename);
      resolve({ file, declaredFormat: format, filename, fields, declaredLength, multipart: true });
    });
    parser.on("error", (e: Error) => {
      if (!started) reject(new UploadRequestError("bad-request", `the multipart body cannot be read: ${e.message}`));
    });
    parser.on("close", () => {
      if (!started) reject(new UploadRequestError("bad-request", "the multipart body holds no file part"));
    });
    source.on("error", (e) => parser.destroy(e));
    source.pipe(parser);
  });
}
