// Streaming ingest: SHA-256 (FIPS 180-4) and a byte count taken on the fly while the body goes to a temp file or
// straight to the store, under a byte limit checked per chunk, so memory stays constant whatever the size.
import { createHash, randomUUID, type Hash } from "node:crypto";
import { createWriteStream } from "node:fs";
import { mkdir, readdir, stat, unlink } from "node:fs/promises";
import path from "node:path";
import { Transform, type Readable, type TransformCallback } from "node:stream";
import { pipeline } from "node:stream/promises";
import { contentKey } from "@/lib/storage/keys";
import { bodyToReadable, type ObjectBody, type ObjectInfo, type ObjectStore } from "@/lib/storage/object-store";

/** The body went past the limit (→ HTTP 413 Content Too Large, RFC 9110 §15.5.14). */
export class PayloadTooLargeError extends Error {
  readonly code = "payload_too_large";
  /** `received` is how far the stream got when it was stopped (or the declared length, if that was too big). */
  constructor(readonly limit: number, readonly received: number) {
    super(`body exceeds the limit of ${limit} bytes (stopped at ${received} bytes)`);
    this.name = "PayloadTooLargeError";
  }
}

export interface IngestLimits {
  /** Largest accepted body in bytes. */
  maxBytes: number;
  /** A length announced up front (Content-Length): past the limit, refused before a byte is read. */
  declaredLength?: number;
  /** Aborts the ingest (e.g. the client went away); the partial output is removed. */
  signal?: AbortSignal;
}

/** Pass-through that hashes and counts, and fails on the chunk that crosses the limit. */
class HashingMeter extends Transform {
  readonly hash: Hash = createHash("sha256");
  bytes = 0;
  constructor(private readonly limit: number) {
    super();
  }
  override _transform(chunk: Buffer, _enc: BufferEncoding, done: TransformCallback): void {
    this.bytes += chunk.length;
    if (this.bytes > this.limit) return done(new PayloadTooLargeError(this.limit, this.bytes));
    this.hash.update(chunk);
    done(null, chunk);
  }
}

function checkLimits(limits: IngestLimits): void {
  limits.signal?.throwIfAborted();
  if (!Number.isSafeInteger(limits.maxBytes) || limits.maxBytes < 0) {
    throw new RangeError(`maxBytes must be a non-negative integer, got ${limits.maxBytes}`);
  }
  if (limits.declaredLength !== undefined && limits.declaredLength > limits.maxBytes) {
    throw new PayloadTooLargeError(limits.maxBytes, limits.declaredLength);
  }
}

/** Refuses before any read, releasing the source (cancelling a web stream stops an HTTP body). */
function meterFor(source: Readable, limits: IngestLimits): HashingMeter {
  try {
    checkLimits(limits);
  } catch (err) {
    source.destroy();
    throw err;
  }
  return new HashingMeter(limits.maxBytes);
}

const STAGED_NAME = /^upload-[0-9a-f-]{36}\.part$/;

export interface StagedFile {
  path: string;
  /** Lowercase hex. */
  sha256: string;
  size: number;
}

/** Writes the body to a fresh temp file in tempDir; on any failure (limit, source error, abort) the file is gone. */
export async function stageToTempFile(body: ObjectBody, tempDir: string, limits: IngestLimits): Promise<StagedFile> {
  const source = bodyToReadable(body);
  const meter = meterFor(source, limits);
  const file = path.join(tempDir, `upload-${randomUUID()}.part`); // matches STAGED_NAME
  try {
    await mkdir(tempDir, { recursive: true });
    await pipeline(source, meter, createWriteStream(file, { flags: "wx" }), { signal: limits.signal });
  } catch (err) {
    await unlink(file).catch(() => undefined);
    throw err;
  }
  return { path: file, sha256: meter.hash.digest("hex"), size: meter.bytes };
}

/** Removes staged uploads older than maxAgeMs from tempDir (left by a crash between staging and storing);
 *  returns how many went. */
export async function removeStaleStaged(tempDir: string, maxAgeMs: number, now: number = Date.now()): Promise<number> {
  let names: string[];
  try {
    names = await readdir(tempDir);
  } catch (err) {
    if ((err as NodeJS.ErrnoException).code === "ENOENT") return 0;
    throw err;
  }
  let removed = 0;
  for (const name of names.filter((n) => STAGED_NAME.test(n))) {
    const file = path.join(tempDir, name);
    const info = await stat(file).catch(() => null);
    if (info && info.mtimeMs < now - maxAgeMs) {
      await unlink(file).catch(() => undefined);
      removed++;
    }
  }
  return removed;
}

export async function discardStaged(staged: StagedFile): Promise<void> {
  await unlink(staged.path).catch((err: NodeJS.ErrnoException) => {
    if (err.code !== "ENOENT") throw err;
  });
}

export interface StoredContent {
  key: string;
  info: ObjectInfo;
  /** True when an object of the same hash and size was already stored, so nothing was uploaded. */
  reused: boolean;
}

/** Moves a staged file into the store under its content key (`contentKey(sha256, kind)`), then removes the
 *  temp file. Same bytes → same key, so a second upload of identical content is not stored twice. */
export async function storeStaged(
  store: ObjectStore, staged: StagedFile, kind: string, options: { contentType?: string } = {},
): Promise<StoredContent> {
  const key = contentKey(staged.sha256, kind);
  try {
    const existing = await store.head(key);
    if (existing && existing.size === staged.size) return { key, info: existing, reused: true };
    const info = await store.putFile(key, staged.path, options);
    return { key, info, reused: false };
  } finally {
    await discardStaged(staged);
  }
}

/** Streams the body straight into the store under a key the caller already knows (e.g. a job artifact),
 *  hashing and counting on the way; a failure leaves the store as it was (puts are atomic). */
export async function streamToStore(
  body: ObjectBody, store: ObjectStore, key: string, limits: IngestLimits & { contentType?: string },
): Promise<{ key: string; sha256: string; size: number; info: ObjectInfo }> {
  const source = bodyToReadable(body);
  const meter = meterFor(source, limits);
  const onAbort = () => source.destroy(limits.signal?.reason instanceof Error ? limits.signal.reason : new Error("ingest aborted"));
  limits.signal?.addEventListener("abort", onAbort, { once: true });
  source.once("error", (err) => meter.destroy(err));
  try {
    const info = await store.put(key, source.pipe(meter), { contentType: limits.contentType });
    return { key, sha256: meter.hash.digest("hex"), size: meter.bytes, info };
  } finally {
    limits.signal?.removeEventListener("abort", onAbort);
    source.destroy();
  }
}
