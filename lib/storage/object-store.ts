// The one storage interface of Rillscale: objects addressed by key, written atomically (a reader sees the old
// object or the new one, never a mix), read whole or by an HTTP-style byte range (RFC 9110 §14.1.2).
import { Readable } from "node:stream";

/** A body to store: Node stream, web stream (e.g. `request.body`) or bytes in memory. */
export type ObjectBody = Readable | ReadableStream<Uint8Array> | Uint8Array;

export interface PutOptions {
  /** Media type recorded with the object where the backend keeps one (S3); the local disk does not. */
  contentType?: string;
}

export interface ObjectInfo {
  /** Size in bytes. */
  size: number;
  /** Opaque validator for HTTP `ETag`, already quoted (`"…"`), when the backend gives one. */
  etag?: string;
  contentType?: string;
}

/** Inclusive byte offsets as in an HTTP `Range: bytes=start-end`; `end` omitted = to the last byte. */
export interface ByteRange {
  start: number;
  end?: number;
}

export interface ObjectRead {
  body: Readable;
  /** Facts about the whole object (size is the full size, not the range's). */
  info: ObjectInfo;
  /** The inclusive range actually served (clamped to the object), present only when one was asked for. */
  range?: { start: number; end: number };
}

export interface ObjectStore {
  readonly backend: "local" | "s3";
  /** Stores the body under key, replacing any object there atomically; on failure the old object stays. */
  put(key: string, body: ObjectBody, options?: PutOptions): Promise<ObjectInfo>;
  putFile(key: string, localPath: string, options?: PutOptions): Promise<ObjectInfo>;
  /** Like putFile, and the local file is gone afterwards: the local disk renames it into place when it lies on
   *  the same filesystem (no second copy of the bytes); other backends upload it, then remove it. */
  moveFile(key: string, localPath: string, options?: PutOptions): Promise<ObjectInfo>;
  /** Throws ObjectNotFoundError for a missing key, RangeNotSatisfiableError for a range past the end. */
  get(key: string, options?: { range?: ByteRange }): Promise<ObjectRead>;
  head(key: string): Promise<ObjectInfo | null>;
  /** Idempotent: deleting a missing key is not an error. */
  delete(key: string): Promise<void>;
  exists(key: string): Promise<boolean>;
  /** Keys that start with prefix, in no particular order. */
  list(prefix: string): AsyncIterable<string>;
}

export class ObjectNotFoundError extends Error {
  readonly code = "object_not_found";
  constructor(readonly key: string) {
    super(`no object stored under "${key}"`);
    this.name = "ObjectNotFoundError";
  }
}

export class RangeNotSatisfiableError extends Error {
  readonly code = "range_not_satisfiable";
  constructor(readonly key: string, readonly size: number, readonly range: ByteRange) {
    super(`range ${range.start}-${range.end ?? ""} is outside "${key}" (${size} bytes)`);
    this.name = "RangeNotSatisfiableError";
  }
}

/** Checks a requested range once, before any backend call; returns it with `end` clamped to the object. */
export function resolveRange(key: string, size: number, range: ByteRange): { start: number; end: number } {
  const { start, end } = range;
  if (!Number.isSafeInteger(start) || start < 0 || (end !== undefined && (!Number.isSafeInteger(end) || end < start))) {
    throw new RangeError(`byte range must be integers with 0 <= start <= end, got ${start}-${end ?? ""}`);
  }
  if (start >= size) throw new RangeNotSatisfiableError(key, size, range);
  return { start, end: Math.min(end ?? size - 1, size - 1) };
}

/** The one conversion of every accepted body to a Node stream (web streams via Readable.fromWeb). */
export function bodyToReadable(body: ObjectBody): Readable {
  if (body instanceof Uint8Array) return Readable.from([body]);
  if (body instanceof Readable) return body;
  return Readable.fromWeb(body as import("node:stream/web").ReadableStream<Uint8Array>);
}
