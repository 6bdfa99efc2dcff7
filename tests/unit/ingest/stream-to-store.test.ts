import { createHash } from "node:crypto";
import { existsSync, mkdtempSync, readdirSync, readFileSync, rmSync, utimesSync, writeFileSync } from "node:fs";
import { tmpdir } from "node:os";
import path from "node:path";
import { Readable } from "node:stream";
import { afterAll, describe, expect, it } from "vitest";
import {
  discardStaged, PayloadTooLargeError, removeStaleStaged, stageToTempFile, storeStaged, streamToStore,
} from "@/lib/ingest/stream-to-store";
import { contentKey } from "@/lib/storage/keys";
import { LocalDiskStore } from "@/lib/storage/local-disk";

const KIB = 1024, MIB = 1024 * KIB, GIB = 1024 * MIB;
// SHA-256("abc") — FIPS 180-4 example (NIST CSRC "SHA256.pdf").
const ABC_SHA256 = "ba7816bf8f01cfea414140de5dae2223b00361a396177a9cb410ff61f20015ad";

const roots: string[] = [];
function tempDir(): string {
  const dir = mkdtempSync(path.join(tmpdir(), "rillscale-ingest-"));
  roots.push(dir);
  return dir;
}
afterAll(() => {
  for (const dir of roots) rmSync(dir, { recursive: true, force: true });
});

/** `total` bytes in `chunk`-sized pieces made on demand (each a fresh buffer, stamped with its index so no two
 *  are alike); `pulled` counts what the consumer has taken. */
function generated(total: number, chunk = 64 * KIB) {
  const template = Buffer.alloc(chunk);
  for (let i = 0; i < chunk; i++) template[i] = (i * 37) & 0xff;
  const counter = { pulled: 0 };
  function* pieces() {
    for (let off = 0, n = 0; off < total; off += chunk, n++) {
      const piece = Buffer.from(template.subarray(0, Math.min(chunk, total - off)));
      if (piece.length >= 8) piece.writeDoubleLE(n, 0);
      counter.pulled += piece.length;
      yield piece;
    }
  }
  return { counter, pieces };
}

/** A web stream (the shape of a fetch `request.body`) that records pulls and cancellation. */
function webSource(total: number, chunk = 64 * KIB) {
  const { counter, pieces } = generated(total, chunk);
  const it = pieces();
  const state = { counter, cancelled: false };
  const stream = new ReadableStream<Uint8Array>({
    pull(c) {
      const next = it.next();
      if (next.done) c.close();
      else c.enqueue(next.value);
    },
    cancel() {
      state.cancelled = true;
    },
  });
  return { stream, state };
}

describe("stageToTempFile()", () => {
  it("hashes what it writes: \"abc\" gives the FIPS 180-4 digest and 3 bytes (NIST FIPS 180-4 example)", async () => {
    const staged = await stageToTempFile(Buffer.from("abc"), tempDir(), { maxBytes: 10 });
    expect(staged).toMatchObject({ sha256: ABC_SHA256, size: 3 });
    expect(readFileSync(staged.path, "utf8")).toBe("abc");
    await discardStaged(staged);
    expect(existsSync(staged.path)).toBe(false);
  });

  it("ingests 1 GiB generated on the fly with RSS growth under 100 MB, and the hash of a second, independent pass (derived)", async () => {
    const dir = tempDir();
    globalThis.gc?.();
    const before = process.memoryUsage().rss;
    let peak = before;
    const sampler = setInterval(() => { peak = Math.max(peak, process.memoryUsage().rss); }, 10);
    const { pieces } = generated(GIB, MIB);
    const started = performance.now();
    const staged = await stageToTempFile(Readable.from(pieces()), dir, { maxBytes: 2 * GIB }).finally(() => clearInterval(sampler));
    const seconds = (performance.now() - started) / 1000;
    peak = Math.max(peak, process.memoryUsage().rss);
    const growthMB = (peak - before) / 1e6;
    console.info(`1 GiB staged in ${seconds.toFixed(1)} s (${(1024 / seconds).toFixed(0)} MiB/s), RSS ${(before / 1e6).toFixed(0)} MB → peak ${(peak / 1e6).toFixed(0)} MB (+${growthMB.toFixed(1)} MB)`);
    expect(staged.size).toBe(GIB);
    expect(growthMB).toBeLessThan(100);
    const reference = createHash("sha256");
    for (const piece of generated(GIB, MIB).pieces()) reference.update(piece);
    expect(staged.sha256).toBe(reference.digest("hex"));
    await discardStaged(staged);
    expect(readdirSync(dir)).toEqual([]);
  });

  it("takes exactly maxBytes and refuses maxBytes + 1 with PayloadTooLargeError, leaving no temp file (derived)", async () => {
    const dir = tempDir();
    const ok = await stageToTempFile(Readable.from(generated(100 * KIB, 10 * KIB).pieces()), dir, { maxBytes: 100 * KIB });
    expect(ok.size).toBe(100 * KIB);
    await discardStaged(ok);
    const err = await stageToTempFile(Readable.from(generated(100 * KIB + 1, 10 * KIB).pieces()), dir, { maxBytes: 100 * KIB })
      .catch((e: unknown) => e);
    expect(err).toBeInstanceOf(PayloadTooLargeError);
    expect((err as PayloadTooLargeError).limit).toBe(100 * KIB);
    expect(readdirSync(dir)).toEqual([]);
  });

  it("stops a 1 GiB web stream one byte over a 1 MiB limit after pulling little more than the limit, and cancels it (derived)", async () => {
    const dir = tempDir();
    const { stream, state } = webSource(GIB);
    await expect(stageToTempFile(stream, dir, { maxBytes: MIB })).rejects.toBeInstanceOf(PayloadTooLargeError);
    // Read-ahead is the stream buffers' high-water marks (16 KiB–64 KiB each) plus the crossing chunk (derived).
    expect(state.counter.pulled).toBeGreaterThan(MIB);
    expect(state.counter.pulled).toBeLessThan(MIB + 2 * MIB);
    expect(state.cancelled).toBe(true);
    expect(readdirSync(dir)).toEqual([]);
  });

  it("refuses a declared length over the limit before reading a byte (RFC 9110 §15.5.14)", async () => {
    const { stream, state } = webSource(GIB);
    await expect(stageToTempFile(stream, tempDir(), { maxBytes: MIB, declaredLength: MIB + 1 }))
      .rejects.toBeInstanceOf(PayloadTooLargeError);
    expect(state.counter.pulled).toBe(0);
    expect(state.cancelled).toBe(true);
  });

  it("a source that fails midway, or an abort, leaves no temp file behind (derived)", async () => {
    const dir = tempDir();
    const failing = Readable.from((function* () {
      yield Buffer.alloc(256 * KIB, 1);
      throw new Error("client closed the connection");
    })());
    await expect(stageToTempFile(failing, dir, { maxBytes: GIB })).rejects.toThrow(/client closed/);
    const controller = new AbortController();
    const { stream } = webSource(GIB);
    const aborted = stageToTempFile(stream, dir, { maxBytes: 2 * GIB, signal: controller.signal });
    setTimeout(() => controller.abort(), 20);
    await expect(aborted).rejects.toMatchObject({ name: "AbortError" });
    expect(readdirSync(dir)).toEqual([]);
  });
});

describe("removeStaleStaged()", () => {
  it("removes staged uploads older than the age and leaves younger ones and other files (derived)", async () => {
    const dir = tempDir();
    const old = await stageToTempFile(Buffer.from("old"), dir, { maxBytes: 10 });
    const young = await stageToTempFile(Buffer.from("young"), dir, { maxBytes: 10 });
    writeFileSync(path.join(dir, "notes.txt"), "keep");
    const twoHoursAgo = (Date.now() - 2 * 3600_000) / 1000;
    utimesSync(old.path, twoHoursAgo, twoHoursAgo);
    utimesSync(path.join(dir, "notes.txt"), twoHoursAgo, twoHoursAgo);
    expect(await removeStaleStaged(dir, 3600_000)).toBe(1);
    expect(readdirSync(dir).sort()).toEqual([path.basename(young.path), "notes.txt"].sort());
    expect(await removeStaleStaged(path.join(dir, "missing"), 0)).toBe(0);
  });
});

describe("storeStaged()", () => {
  it("moves the staged file under its content key and reuses it when the same bytes come again (derived)", async () => {
    const store = new LocalDiskStore({ root: path.join(tempDir(), "objects") });
    const dir = tempDir();
    const first = await storeStaged(store, await stageToTempFile(Buffer.from("abc"), dir, { maxBytes: 10 }), "datasets");
    expect(first).toMatchObject({ key: contentKey(ABC_SHA256, "datasets"), reused: false, info: { size: 3 } });
    const second = await storeStaged(store, await stageToTempFile(Buffer.from("abc"), dir, { maxBytes: 10 }), "datasets");
    expect(second).toMatchObject({ key: first.key, reused: true });
    expect(readdirSync(dir)).toEqual([]);
  });
});

describe("streamToStore()", () => {
  it("writes straight to the store with the hash of what it wrote, and stores nothing past the limit (derived)", async () => {
    const store = new LocalDiskStore({ root: path.join(tempDir(), "objects") });
    const done = await streamToStore(Buffer.from("abc"), store, "jobs/j1/summary.json", { maxBytes: 3 });
    expect(done).toMatchObject({ sha256: ABC_SHA256, size: 3, info: { size: 3 } });
    const { stream, state } = webSource(64 * MIB);
    await expect(streamToStore(stream, store, "jobs/j1/too-big.tif", { maxBytes: MIB })).rejects.toBeInstanceOf(PayloadTooLargeError);
    expect(state.counter.pulled).toBeLessThan(3 * MIB);
    expect(await store.exists("jobs/j1/too-big.tif")).toBe(false);
  });
});
