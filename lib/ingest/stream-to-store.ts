// Streaming ingest: SHA-256 (FIPS 180-4) and a byte count taken on the fly while the body goes to a temp file or
// straight to the store, under a byte limit checked per chunk, so memory stays constant whatever the size.
import { createHash, randomUUID, type Hash } from "node:crypto";
import { constants as fsConstants } from "node:fs";
import { mkdir, open, readdir, stat, unlink, type FileHandle } from "node:fs/promises";
import path from "node:path";
import { addAbortSignal, Transform, type Readable, type TransformCallback } from "node:stream";
import { contentKey } from "@/lib/storage/keys";
import { writeStreamToFile } from "@/lib/storage/pipelined-write";
import { FollowingHash } from "@/lib/ingest/following-hash";
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

/** Counts bytes and fails on the chunk that crosses the limit. */
class ByteLimit {
  bytes = 0;
  constructor(private readonly limit: number) {}
  count(chunk: Uint8Array): void {
    this.bytes += chunk.byteLength;
    if (this.bytes > this.limit) throw new PayloadTooLargeError(this.limit, this.bytes);
  }
}

/** Pass-through that counts under the limit and hashes, in front of a store's put. */
class HashingMeter extends Transform {
  readonly hash: Hash = createHash("sha256");
  private readonly counter: ByteLimit;
  constructor(limit: number) {
    super();
    this.counter = new ByteLimit(limit);
  }
  get bytes(): number {
    return this.counter.bytes;
  }
  override _transform(chunk: Buffer, _enc: BufferEncoding, done: TransformCallback): void {
    try {
      this.counter.count(chunk);
    } catch (err) {
      return done(err as Error);
    }
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
function refuseEarly(source: Readable, limits: IngestLimits): void {
  try {
    checkLimits(limits);
  } catch (err) {
    source.destroy();
    throw err;
  }
}

const STAGED_NAME = /^upload-[0-9a-f-]{36}\.part$/;
/** The mode objects of the local store have, since a staged file may become one by rename. */
const STAGED_MODE = 0o644;

export interface StagedFile {
  path: string;
  /** Lowercase hex. */
  sha256: string;
  size: number;
}

/** Writes the body to a fresh temp file in tempDir; on any failure (limit, source error, abort) the file is gone.
 *  The request thread only counts and writes (pipelined, flushed to disk as the file grows: so moving it into a
 *  local store durably costs little more than a rename); the SHA-256 is taken beside it by a thread that reads
 *  each written stretch back from the page cache (lib/ingest/following-hash.ts). */
export async function stageToTempFile(body: ObjectBody, tempDir: string, limits: IngestLimits): Promise<StagedFile> {
  const source = bodyToReadable(body);
  refuseEarly(source, limits);
  const counter = new ByteLimit(limits.maxBytes);
  const file = path.join(tempDir, `upload-${randomUUID()}.part`); // matches STAGED_NAME
  let handle: FileHandle | undefined;
  let hasher: FollowingHash | undefined;
  try {
    if (limits.signal) addAbortSignal(limits.signal, source);
    await mkdir(tempDir, { recursive: true });
    handle = await open(file, fsConstants.O_CREAT | fsConstants.O_EXCL | fsConstants.O_WRONLY, STAGED_MODE);
    const following = new FollowingHash(file);
    hasher = following;
    const size = await writeStreamToFile(source, handle, { onChunk: (chunk) => counter.count(chunk), onWritten: (n) => following.advance(n) });
    await handle.close();
    handle = undefined;
    return { path: file, sha256: await following.digest(size), size };
  } catch (err) {
    source.destroy();
    hasher?.stop();
    await handle?.close().catch(() => undefined);
    await unlink(file).catch(() => undefined);
    throw err;
  }
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

/** Moves a staged file into the store under its content key (`contentKey(sha256, kind)`): a rename when the
 *  store is local disk on the same filesystem, else an upload; the temp file is gone afterwards either way.
 *  Same bytes → same key, so a second upload of identical content is not stored twice. */
export async function storeStaged(
  store: ObjectStore, staged: StagedFile, kind: string, options: { contentType?: string } = {},
): Promise<StoredContent> {
  const key = contentKey(staged.sha256, kind);
  try {
    const existing = await store.head(key);
    if (existing && existing.size === staged.size) return { key, info: existing, reused: true };
    const info = await store.moveFile(key, staged.path, options);
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
  refuseEarly(source, limits);
  const meter = new HashingMeter(limits.maxBytes);
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
