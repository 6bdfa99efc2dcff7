// S3-compatible object store over the AWS SDK for JavaScript v3. Atomic replace is S3's own guarantee: a
// PutObject or CompleteMultipartUpload makes the whole new object visible at once (Amazon S3 User Guide,
// "Amazon S3 data consistency model"); a failed upload is aborted so no parts or half objects remain.
import {
  DeleteObjectCommand, GetObjectCommand, HeadObjectCommand, ListObjectsV2Command, S3Client, S3ServiceException,
} from "@aws-sdk/client-s3";
import { Upload } from "@aws-sdk/lib-storage";
import { createReadStream } from "node:fs";
import { unlink } from "node:fs/promises";
import { Transform, type Readable } from "node:stream";
import { assertKeyPrefix, assertObjectKey } from "@/lib/storage/keys";
import {
  bodyToReadable, ObjectNotFoundError, RangeNotSatisfiableError, resolveRange,
  type ByteRange, type ObjectBody, type ObjectInfo, type ObjectRead, type ObjectStore, type PutOptions,
} from "@/lib/storage/object-store";

/** S3's minimum part size for every part but the last (Amazon S3 User Guide, "multipart upload limits"). */
export const S3_MIN_PART_SIZE = 5 * 1024 * 1024;

export interface S3StoreOptions {
  bucket: string;
  region: string;
  /** For S3-compatible servers (MinIO, Ceph, a local fake); absent = AWS. */
  endpoint?: string;
  /** Path-style URLs (`endpoint/bucket/key`), needed by most S3-compatible servers. */
  forcePathStyle: boolean;
  /** Absent = the SDK's default credential chain. */
  credentials?: { accessKeyId: string; secretAccessKey: string; sessionToken?: string };
  /** Bodies larger than one part go up as a multipart upload; memory held per put ≈ partSize × queueSize. */
  partSize: number;
  queueSize: number;
  /** "when_required" sends no CRC trailers with streamed bodies (aws-chunked encoding), which many
   *  S3-compatible servers store verbatim as part of the object; "when_supported" is AWS's default. */
  checksums: "when_required" | "when_supported";
}

function statusOf(err: unknown): number | undefined {
  return err instanceof S3ServiceException ? err.$metadata.httpStatusCode : undefined;
}

/** Bytes passing through, counted: Upload does not report the size of a streamed body. */
function byteCounter(): Transform & { bytes: number } {
  const counter = new Transform({
    transform(chunk: Buffer, _enc, done) {
      counter.bytes += chunk.length;
      done(null, chunk);
    },
  }) as Transform & { bytes: number };
  counter.bytes = 0;
  return counter;
}

export class S3Store implements ObjectStore {
  readonly backend = "s3" as const;
  readonly client: S3Client;
  private readonly options: S3StoreOptions;

  constructor(options: S3StoreOptions) {
    if (!options.bucket) throw new RangeError("S3 object store needs a bucket");
    if (!Number.isSafeInteger(options.partSize) || options.partSize < S3_MIN_PART_SIZE) {
      throw new RangeError(`S3 part size must be an integer ≥ ${S3_MIN_PART_SIZE} bytes, got ${options.partSize}`);
    }
    if (!Number.isSafeInteger(options.queueSize) || options.queueSize < 1) {
      throw new RangeError(`S3 upload queue size must be a positive integer, got ${options.queueSize}`);
    }
    this.options = options;
    const checksum = options.checksums === "when_required" ? "WHEN_REQUIRED" : "WHEN_SUPPORTED";
    this.client = new S3Client({
      region: options.region,
      endpoint: options.endpoint,
      forcePathStyle: options.forcePathStyle,
      credentials: options.credentials,
      requestChecksumCalculation: checksum,
      responseChecksumValidation: checksum,
    });
  }

  async put(key: string, body: ObjectBody, options: PutOptions = {}): Promise<ObjectInfo> {
    const source = body instanceof Uint8Array ? undefined : bodyToReadable(body);
    try {
      assertObjectKey(key);
    } catch (err) {
      source?.destroy();
      throw err;
    }
    let counted: (Transform & { bytes: number }) | undefined;
    if (source) {
      counted = byteCounter();
      // pipe() does not forward errors: a failing source must fail the upload, which then aborts it.
      source.once("error", (err) => counted?.destroy(err));
      source.pipe(counted);
    }
    const upload = new Upload({
      client: this.client,
      params: { Bucket: this.options.bucket, Key: key, Body: counted ?? body, ContentType: options.contentType },
      partSize: this.options.partSize,
      queueSize: this.options.queueSize,
      leavePartsOnError: false,
    });
    try {
      const done = await upload.done();
      const size = counted ? counted.bytes : (body as Uint8Array).byteLength;
      return { size, etag: done.ETag, contentType: options.contentType };
    } finally {
      source?.destroy();
    }
  }

  putFile(key: string, localPath: string, options: PutOptions = {}): Promise<ObjectInfo> {
    return this.put(key, createReadStream(localPath), options);
  }

  async moveFile(key: string, localPath: string, options: PutOptions = {}): Promise<ObjectInfo> {
    const info = await this.putFile(key, localPath, options);
    await unlink(localPath);
    return info;
  }

  async get(key: string, options: { range?: ByteRange } = {}): Promise<ObjectRead> {
    assertObjectKey(key);
    if (options.range) resolveRange(key, Number.MAX_SAFE_INTEGER, options.range); // shape only; S3 knows the size
    const range = options.range ? `bytes=${options.range.start}-${options.range.end ?? ""}` : undefined;
    try {
      const res = await this.client.send(new GetObjectCommand({ Bucket: this.options.bucket, Key: key, Range: range }));
      const info: ObjectInfo = { size: res.ContentLength ?? 0, etag: res.ETag, contentType: res.ContentType };
      const body = res.Body as Readable;
      if (!options.range) return { body, info };
      // "bytes 0-4/11": the served range and the whole object's size.
      const m = /^bytes (\d+)-(\d+)\/(\d+)$/.exec(res.ContentRange ?? "");
      if (!m) throw new Error(`S3 answered a range request without a usable Content-Range (${res.ContentRange})`);
      info.size = Number(m[3]);
      return { body, info, range: { start: Number(m[1]), end: Number(m[2]) } };
    } catch (err) {
      if (statusOf(err) === 404) throw new ObjectNotFoundError(key);
      if (statusOf(err) === 416 && options.range) {
        const head = await this.head(key);
        if (!head) throw new ObjectNotFoundError(key);
        throw new RangeNotSatisfiableError(key, head.size, options.range);
      }
      throw err;
    }
  }

  async head(key: string): Promise<ObjectInfo | null> {
    assertObjectKey(key);
    try {
      const res = await this.client.send(new HeadObjectCommand({ Bucket: this.options.bucket, Key: key }));
      return { size: res.ContentLength ?? 0, etag: res.ETag, contentType: res.ContentType };
    } catch (err) {
      if (statusOf(err) === 404) return null;
      throw err;
    }
  }

  async exists(key: string): Promise<boolean> {
    return (await this.head(key)) !== null;
  }

  async delete(key: string): Promise<void> {
    assertObjectKey(key);
    await this.client.send(new DeleteObjectCommand({ Bucket: this.options.bucket, Key: key }));
  }

  async *list(prefix: string): AsyncIterable<string> {
    assertKeyPrefix(prefix);
    let token: string | undefined;
    do {
      const res = await this.client.send(new ListObjectsV2Command({
        Bucket: this.options.bucket, Prefix: prefix, ContinuationToken: token,
      }));
      for (const item of res.Contents ?? []) if (item.Key) yield item.Key;
      token = res.IsTruncated ? res.NextContinuationToken : undefined;
    } while (token);
  }
}
