// One behaviour suite for every ObjectStore adapter: local disk, and S3 against a fake S3 server (s3rver).
import { ListMultipartUploadsCommand } from "@aws-sdk/client-s3";
import { createHash } from "node:crypto";
import { mkdtempSync, readdirSync, rmSync, writeFileSync } from "node:fs";
import { tmpdir } from "node:os";
import path from "node:path";
import { Readable } from "node:stream";
import S3rver from "s3rver";
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { InvalidObjectKeyError } from "@/lib/storage/keys";
import { LocalDiskStore } from "@/lib/storage/local-disk";
import { ObjectNotFoundError, RangeNotSatisfiableError, type ObjectStore } from "@/lib/storage/object-store";
import { S3_MIN_PART_SIZE, S3Store } from "@/lib/storage/s3";

const MIB = 1024 * 1024;
const BUCKET = "rillscale-test";

async function readAll(body: Readable): Promise<Buffer> {
  const chunks: Buffer[] = [];
  for await (const chunk of body) chunks.push(Buffer.from(chunk as Uint8Array));
  return Buffer.concat(chunks);
}

/** n bytes of a pattern that differs per seed and never repeats within a part, so a mix of versions shows. */
function patterned(n: number, seed: number): Buffer {
  const b = Buffer.allocUnsafe(n);
  for (let i = 0; i < n; i++) b[i] = (i * 131 + (i >>> 12) * 7 + seed * 89) & 0xff;
  return b;
}

const sha256 = (b: Buffer) => createHash("sha256").update(b).digest("hex");

/** A source that yields `good` bytes, then fails, as a dropped upload connection does. */
function failingSource(good: Buffer): Readable {
  let sent = false;
  return new Readable({
    read() {
      if (!sent) {
        sent = true;
        this.push(good);
      } else {
        this.destroy(new Error("connection reset by peer"));
      }
    },
  });
}

interface Adapter {
  name: string;
  setUp(): Promise<ObjectStore>;
  tearDown(): Promise<void>;
  /** Writes begun and never finished nor cleaned up: temp files on disk, multipart uploads neither completed nor aborted. */
  leftovers(store: ObjectStore): Promise<string[]>;
  /** Parts sent by multipart uploads so far (S3 only). */
  partsSent?(): number;
  /** Intervals in which the server was committing an object (S3 only): s3rver rewrites its object file in
   *  place (fs.createWriteStream over it) where S3 swaps atomically, so reads overlapping these are the
   *  fake's limitation, not the adapter's, and are left out. */
  commitWindows?(): [number, number][];
}

const tempDirs: string[] = [];
function tempDir(label: string): string {
  const dir = mkdtempSync(path.join(tmpdir(), `rillscale-${label}-`));
  tempDirs.push(dir);
  return dir;
}
afterAll(() => {
  for (const dir of tempDirs) rmSync(dir, { recursive: true, force: true });
});

/** Every S3 command the adapter sends, with its start and end time, recorded by an SDK middleware. */
const sent: { name: string; uploadId?: string; start: number; end: number }[] = [];
let fake: S3rver | undefined;

const adapters: Adapter[] = [
  {
    name: "local disk",
    async setUp() {
      return new LocalDiskStore({ root: path.join(tempDir("objects"), "objects") });
    },
    async tearDown() {},
    async leftovers(store) {
      const found: string[] = [];
      const walk = (dir: string): void => {
        for (const e of readdirSync(dir, { withFileTypes: true })) {
          if (e.isDirectory()) walk(path.join(dir, e.name));
          else if (e.name.endsWith(".tmp")) found.push(path.join(dir, e.name));
        }
      };
      walk((store as LocalDiskStore).root);
      return found;
    },
  },
  {
    name: "S3 (s3rver)",
    async setUp() {
      fake = new S3rver({ address: "127.0.0.1", port: 0, silent: true, directory: tempDir("s3rver"), configureBuckets: [{ name: BUCKET }] });
      const { port } = await fake.run();
      const store = new S3Store({
        bucket: BUCKET, region: "us-east-1", endpoint: `http://127.0.0.1:${port}`, forcePathStyle: true,
        credentials: { accessKeyId: "S3RVER", secretAccessKey: "S3RVER" },
        partSize: S3_MIN_PART_SIZE, queueSize: 2, checksums: "when_required",
      });
      store.client.middlewareStack.add((next, context) => async (args) => {
        const start = performance.now();
        const input = args.input as { UploadId?: string };
        try {
          const out = await next(args);
          const uploadId = input.UploadId ?? (out.output as { UploadId?: string }).UploadId;
          sent.push({ name: context.commandName ?? "?", uploadId, start, end: performance.now() });
          return out;
        } catch (err) {
          sent.push({ name: context.commandName ?? "?", uploadId: input.UploadId, start, end: performance.now() });
          throw err;
        }
      }, { step: "initialize", name: "recordCommands" });
      return store;
    },
    async tearDown() {
      await fake?.close();
    },
    async leftovers() {
      const created = sent.filter((c) => c.name === "CreateMultipartUploadCommand").map((c) => c.uploadId);
      const closed = new Set(sent.filter((c) => /^(Complete|Abort)MultipartUploadCommand$/.test(c.name)).map((c) => c.uploadId));
      return created.filter((id) => !closed.has(id)).map(String);
    },
    partsSent: () => sent.filter((c) => c.name === "UploadPartCommand").length,
    commitWindows: () => sent.filter((c) => /^(PutObject|CompleteMultipartUpload)Command$/.test(c.name)).map((c) => [c.start, c.end]),
  },
];

describe.each(adapters)("ObjectStore on $name", (adapter) => {
  let store: ObjectStore;
  beforeAll(async () => {
    store = await adapter.setUp();
  });
  afterAll(() => adapter.tearDown());

  it("put() then get() returns the same bytes, and head() their size (derived)", async () => {
    const bytes = Buffer.from("Tallow Creek gauge 3\n");
    const written = await store.put("t/basic/a.txt", bytes, { contentType: "text/plain" });
    expect(written.size).toBe(bytes.length);
    const read = await store.get("t/basic/a.txt");
    expect((await readAll(read.body)).equals(bytes)).toBe(true);
    expect(read.info.size).toBe(bytes.length);
    const head = await store.head("t/basic/a.txt");
    expect(head?.size).toBe(bytes.length);
    expect(head?.etag).toMatch(/^".+"$/);
    expect(await store.exists("t/basic/a.txt")).toBe(true);
  });

  it("put() accepts a web ReadableStream, a Node Readable, and putFile() a local file, all byte-exact (derived)", async () => {
    const bytes = patterned(100_000, 1);
    const web = new ReadableStream<Uint8Array>({
      start(c) {
        c.enqueue(bytes.subarray(0, 40_000));
        c.enqueue(bytes.subarray(40_000));
        c.close();
      },
    });
    expect((await store.put("t/forms/web", web)).size).toBe(bytes.length);
    expect((await store.put("t/forms/node", Readable.from([bytes.subarray(0, 7), bytes.subarray(7)]))).size).toBe(bytes.length);
    const file = path.join(tempDir("file"), "in.bin");
    writeFileSync(file, bytes);
    expect((await store.putFile("t/forms/file", file)).size).toBe(bytes.length);
    for (const key of ["t/forms/web", "t/forms/node", "t/forms/file"]) {
      expect(sha256(await readAll((await store.get(key)).body)), key).toBe(sha256(bytes));
    }
  });

  it("get() with a range serves inclusive offsets as HTTP Range does, clamped at the end (RFC 9110 §14.1.2)", async () => {
    const bytes = Buffer.from("0123456789");
    await store.put("t/range/digits", bytes);
    const mid = await store.get("t/range/digits", { range: { start: 2, end: 5 } });
    expect((await readAll(mid.body)).toString()).toBe("2345");
    expect(mid.range).toEqual({ start: 2, end: 5 });
    expect(mid.info.size).toBe(10);
    const tail = await store.get("t/range/digits", { range: { start: 7 } });
    expect((await readAll(tail.body)).toString()).toBe("789");
    expect(tail.range).toEqual({ start: 7, end: 9 });
    const past = await store.get("t/range/digits", { range: { start: 8, end: 100 } });
    expect((await readAll(past.body)).toString()).toBe("89");
    expect(past.range).toEqual({ start: 8, end: 9 });
    await expect(store.get("t/range/digits", { range: { start: 10 } })).rejects.toBeInstanceOf(RangeNotSatisfiableError);
    await expect(store.get("t/range/digits", { range: { start: 5, end: 2 } })).rejects.toBeInstanceOf(RangeError);
  });

  it("a missing key: get() throws ObjectNotFoundError, head() is null, exists() false, delete() is a no-op (derived)", async () => {
    await expect(store.get("t/missing/none")).rejects.toBeInstanceOf(ObjectNotFoundError);
    expect(await store.head("t/missing/none")).toBeNull();
    expect(await store.exists("t/missing/none")).toBe(false);
    await expect(store.delete("t/missing/none")).resolves.toBeUndefined();
  });

  it("delete() removes the object and list() shows only keys under the prefix (derived)", async () => {
    await store.put("t/list/a/1", Buffer.from("1"));
    await store.put("t/list/a/2", Buffer.from("2"));
    await store.put("t/list/ab/3", Buffer.from("3"));
    await store.put("t/list/b/4", Buffer.from("4"));
    const keys = async (prefix: string) => {
      const out: string[] = [];
      for await (const k of store.list(prefix)) out.push(k);
      return out.sort();
    };
    expect(await keys("t/list/a/")).toEqual(["t/list/a/1", "t/list/a/2"]);
    expect(await keys("t/list/a")).toEqual(["t/list/a/1", "t/list/a/2", "t/list/ab/3"]);
    await store.delete("t/list/a/1");
    expect(await store.exists("t/list/a/1")).toBe(false);
    expect(await keys("t/list/")).toEqual(["t/list/a/2", "t/list/ab/3", "t/list/b/4"]);
  });

  it("keys that could climb out of the store or hide are refused before any I/O (derived)", async () => {
    for (const key of ["../escape", "a/../../escape", "/abs", "a//b", "a/", ".hidden", "a/.x.tmp", "a\\b", "spa ce", ""]) {
      await expect(store.put(key, Buffer.from("x")), key).rejects.toBeInstanceOf(InvalidObjectKeyError);
      await expect(store.get(key), key).rejects.toBeInstanceOf(InvalidObjectKeyError);
    }
  });

  it("an object larger than the part size (12 MiB in 5 MiB parts) round-trips byte-exact (Amazon S3 multipart limits)", async () => {
    const big = patterned(12 * MIB, 2);
    const partsBefore = adapter.partsSent?.();
    const written = await store.put("t/big/twelve", Readable.from([big.subarray(0, 7 * MIB), big.subarray(7 * MIB)]));
    expect(written.size).toBe(big.length);
    // 12 MiB in 5 MiB parts = 5 + 5 + 2 (derived).
    if (partsBefore !== undefined) expect(adapter.partsSent!() - partsBefore).toBe(3);
    expect(sha256(await readAll((await store.get("t/big/twelve")).body))).toBe(sha256(big));
    expect((await store.head("t/big/twelve"))?.size).toBe(big.length);
  });

  it("a put whose source fails midway leaves the previous object whole and nothing half-written (derived)", async () => {
    const old = patterned(6 * MIB, 3);
    await store.put("t/fail/obj", old);
    await expect(store.put("t/fail/obj", failingSource(patterned(6 * MIB, 4)))).rejects.toThrow(/connection reset/);
    expect(sha256(await readAll((await store.get("t/fail/obj")).body))).toBe(sha256(old));
    await expect(store.put("t/fail/new", failingSource(patterned(MIB, 5)))).rejects.toThrow(/connection reset/);
    expect(await store.exists("t/fail/new")).toBe(false);
    expect(await adapter.leftovers(store)).toEqual([]);
  });

  it("readers during an overwrite of a 12 MiB object see the old or the new version, never a mix (derived)", async () => {
    const v1 = patterned(12 * MIB, 6), v2 = patterned(12 * MIB, 7);
    await store.put("t/atomic/obj", v1);
    let writtenAt = Infinity;
    // A slow source (1 MiB per 50 ms), as a client upload is, so that many reads overlap the write.
    const write = store.put("t/atomic/obj", Readable.from((async function* () {
      for (let off = 0; off < v2.length; off += MIB) {
        await new Promise((resolve) => setTimeout(resolve, 50));
        yield v2.subarray(off, off + MIB);
      }
    })())).finally(() => { writtenAt = performance.now(); });
    const reads: { start: number; end: number; hash: string }[] = [];
    // Read until the write is done and one read has begun after it.
    while (!reads.some((r) => r.start > writtenAt)) {
      const start = performance.now();
      const hash = await store.get("t/atomic/obj").then((r) => readAll(r.body)).then(sha256, (err: Error) => `error: ${err.message}`);
      reads.push({ start, end: performance.now(), hash });
    }
    await write;
    const windows = adapter.commitWindows?.() ?? [];
    const judged = reads.filter((r) => !windows.some(([a, b]) => r.start <= b && r.end >= a));
    expect(judged.length).toBeGreaterThanOrEqual(2);
    for (const r of judged) expect([sha256(v1), sha256(v2)], "a read returned a mix of versions").toContain(r.hash);
    expect(judged[0].hash).toBe(sha256(v1));
    expect(sha256(await readAll((await store.get("t/atomic/obj")).body))).toBe(sha256(v2));
  });
});
