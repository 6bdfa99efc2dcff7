import { createHash } from "node:crypto";
import { mkdtempSync, readFileSync, rmSync } from "node:fs";
import { open } from "node:fs/promises";
import { tmpdir } from "node:os";
import path from "node:path";
import { Readable } from "node:stream";
import { afterAll, describe, expect, it } from "vitest";
import { WRITE_BATCH_BYTES, writeStreamToFile } from "@/lib/storage/pipelined-write";

const base = mkdtempSync(path.join(tmpdir(), "rillscale-pipelined-"));
afterAll(() => rmSync(base, { recursive: true, force: true }));

/** Chunks of uneven sizes (1 byte to ~200 KiB), each stamped with its index so misplaced bytes show. */
function chunks(total: number): Buffer[] {
  const out: Buffer[] = [];
  for (let off = 0, n = 0; off < total; n++) {
    const size = Math.min(total - off, 1 + ((n * 7919) % (200 * 1024)));
    out.push(Buffer.alloc(size, n & 0xff));
    off += size;
  }
  return out;
}

const sha256 = (b: Uint8Array) => createHash("sha256").update(b).digest("hex");

describe("writeStreamToFile()", () => {
  it("writes 20 MiB of uneven chunks byte-exact with several writes in flight, and reports a growing prefix that ends at the size (derived)", async () => {
    const parts = chunks(20 * 1024 * 1024 + 3);
    const file = path.join(base, "a.bin");
    const handle = await open(file, "w");
    const prefixes: number[] = [];
    const seen: number[] = [];
    const size = await writeStreamToFile(Readable.from(parts), handle, { onChunk: (c) => seen.push(c.byteLength), onWritten: (n) => prefixes.push(n) });
    await handle.close();
    expect(size).toBe(20 * 1024 * 1024 + 3);
    expect(seen).toEqual(parts.map((p) => p.length));
    expect(sha256(readFileSync(file))).toBe(sha256(Buffer.concat(parts)));
    // invariant: the written prefix only grows, in steps of at least one batch except the last
    expect(prefixes.at(-1)).toBe(size);
    for (let i = 1; i < prefixes.length; i++) expect(prefixes[i]).toBeGreaterThan(prefixes[i - 1]);
    expect(prefixes.length).toBeLessThanOrEqual(Math.ceil(size / WRITE_BATCH_BYTES));
  });

  it("stops at the chunk onChunk refuses, rejects with that error and destroys the source (derived)", async () => {
    const handle = await open(path.join(base, "b.bin"), "w");
    const source = Readable.from(chunks(8 * 1024 * 1024));
    let taken = 0;
    const err = await writeStreamToFile(source, handle, {
      onChunk: (c) => { taken += c.byteLength; if (taken > 3 * 1024 * 1024) throw new RangeError("over the limit"); },
    }).catch((e: unknown) => e);
    await handle.close();
    expect(err).toBeInstanceOf(RangeError);
    expect(source.destroyed).toBe(true);
  });
});
