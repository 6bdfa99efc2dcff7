import { Readable } from "node:stream";
import { describe, expect, test } from "vitest";
import yazl from "yazl";
import { safeUnzip } from "@/lib/vector/safe-unzip";
import { VectorError } from "@/lib/vector/vector-error";

type Entry = { name: string; data?: Buffer; mode?: number; zeros?: number };

/** Builds a zip with yazl; `rename` then swaps equal-length names in the bytes, since yazl itself refuses unsafe names. */
async function makeZip(entries: Entry[], rename: [string, string][] = []): Promise<Buffer> {
  const zip = new yazl.ZipFile();
  for (const e of entries) {
    if (e.zeros !== undefined) {
      const chunk = Buffer.alloc(64 * 1024);
      let left = e.zeros;
      const stream = new Readable({ read() { if (left <= 0) this.push(null); else { const n = Math.min(left, chunk.length); left -= n; this.push(chunk.subarray(0, n)); } } });
      zip.addReadStream(stream, e.name);
    } else zip.addBuffer(e.data ?? Buffer.from("x"), e.name, e.mode !== undefined ? { mode: e.mode } : {});
  }
  zip.end();
  const parts: Buffer[] = [];
  for await (const part of zip.outputStream as AsyncIterable<Buffer>) parts.push(part);
  let buf = Buffer.concat(parts);
  for (const [from, to] of rename) {
    expect(from.length).toBe(to.length);
    let at = buf.indexOf(from);
    expect(at).toBeGreaterThanOrEqual(0);
    while (at >= 0) { buf.write(to, at, "latin1"); at = buf.indexOf(from, at + 1); }
  }
  return buf;
}

/** Overwrites the uncompressed size every central-directory record declares (APPNOTE 4.3.12, offset 24). */
function lieAboutSizes(zip: Buffer, size: number): Buffer {
  const out = Buffer.from(zip);
  for (let at = out.indexOf(Buffer.from([0x50, 0x4b, 0x01, 0x02])); at >= 0; at = out.indexOf(Buffer.from([0x50, 0x4b, 0x01, 0x02]), at + 4)) out.writeUInt32LE(size, at + 24);
  return out;
}

async function refusal(p: Promise<unknown>): Promise<VectorError> {
  try { await p; } catch (e) { if (e instanceof VectorError) return e; throw e; }
  throw new Error("expected a VectorError");
}

describe("safeUnzip()", () => {
  test("inflates plain entries and keeps only those asked for (derived)", async () => {
    const zip = await makeZip([{ name: "a/lines.shp", data: Buffer.from("shp") }, { name: "readme.txt", data: Buffer.from("hello") }]);
    const { files, totalBytes } = await safeUnzip(zip, (n) => n.endsWith(".shp"));
    expect([...files.keys()]).toEqual(["a/lines.shp"]);
    expect(files.get("a/lines.shp")!.toString()).toBe("shp");
    expect(totalBytes).toBe(3);
  });

  test("gives back exactly the bytes that were zipped (invariant)", async () => {
    const data = Buffer.alloc(300_000);
    for (let i = 0, v = 1; i < data.length; i++) { v = (v * 1103515245 + 12345) >>> 0; data[i] = v >>> 24; }
    const { files } = await safeUnzip(await makeZip([{ name: "random.bin", data }]));
    expect(files.get("random.bin")!.equals(data)).toBe(true);
  });

  test("refuses entries named ../x and /abs/x, and a symbolic link (APPNOTE 6.3.10 §4.4.15; path rules common practice)", async () => {
    const dotdot = await makeZip([{ name: "zz/x" }], [["zz/x", "../x"]]);
    expect((await refusal(safeUnzip(dotdot))).detail).toMatch(/"\.\.\/x" is refused: it has a '\.\.' component/);
    const abs = await makeZip([{ name: "qabs/x" }], [["qabs/x", "/abs/x"]]);
    expect((await refusal(safeUnzip(abs))).detail).toMatch(/"\/abs\/x" is refused: it has an absolute path/);
    const link = await makeZip([{ name: "lines.shp", data: Buffer.from("/etc/passwd"), mode: 0o120777 }]);
    const e = await refusal(safeUnzip(link));
    expect(e.code).toBe("unsafe_zip_entry");
    expect(e.detail).toMatch(/symbolic link/);
  });

  test("refuses an entry whose declared size passes the cap before inflating it (derived)", async () => {
    const zip = await makeZip([{ name: "big.bin", zeros: 8 * 1024 * 1024 }]);
    const e = await refusal(safeUnzip(zip, () => true, { maxTotalBytes: 1024 * 1024 }));
    expect(e.code).toBe("zip_too_large");
    expect(e.detail).toMatch(/declares 8388608 bytes/);
  });

  test("stops a zip that lies about its sizes at the cap while inflating, holding at most one chunk more (regression: zip bomb)", async () => {
    const cap = 1024 * 1024;
    const zip = lieAboutSizes(await makeZip([{ name: "bomb.bin", zeros: 64 * 1024 * 1024 }]), 100);
    expect(zip.length).toBeLessThan(cap); // 64 MiB of zeros deflate to well under the cap
    const e = await refusal(safeUnzip(zip, () => true, { maxTotalBytes: cap }));
    expect(e.code).toBe("zip_too_large");
    const stoppedAt = Number(/stopped at (\d+) bytes/.exec(e.detail)![1]);
    expect(stoppedAt).toBeGreaterThan(cap);
    expect(stoppedAt).toBeLessThanOrEqual(cap + 64 * 1024); // zlib hands out chunks of at most 64 KiB
  });

  test("refuses more entries than the cap, and bytes that are not a zip (derived)", async () => {
    const zip = await makeZip([{ name: "a" }, { name: "b" }, { name: "c" }]);
    expect((await refusal(safeUnzip(zip, () => true, { maxEntries: 2 }))).code).toBe("zip_too_many_entries");
    expect((await refusal(safeUnzip(Buffer.from("not a zip at all, just text")))).code).toBe("bad_zip");
  });
});
