// Large uploads: 1 GiB of GeoTIFF generated on the fly and streamed (the server's RSS grows < 100 MB), and bodies
// over the limit answered 413 before they are sent in full. Bodies go through node:http so the test controls
// every chunk and sees the answer the moment it comes.
import http from "node:http";
import { beforeAll, describe, expect, it } from "vitest";
import { ADMIN, api, createKey, signIn, stack } from "@/tests/integration/client";
import { countRows, treeRssBytes } from "@/tests/integration/data-helpers";

const GIB = 1024 ** 3;
/** lib/jobs/config.ts default: the test stack does not change it. */
const LIMIT = 2 * GIB;
const CHUNK = 1024 * 1024;
let key = "";

beforeAll(async () => {
  key = (await createKey(await signIn(ADMIN), ["datasets:write", "jobs:read"], "large uploads")).secret;
});

/** Header of an uncompressed little-endian Float32 TIFF 6.0 (Adobe 1992) with one strip per row, georeferenced
 *  in UTM 33N (GeoTIFF 1.1 keys 1024, 1025, 3072); the pixel bytes follow it. */
function tiffHeader(width: number, height: number): Buffer {
  const entries: [number, number, number, number | Buffer][] = []; // tag, type, count, value or out-of-line bytes
  const longs = (n: number, f: (i: number) => number) => { const b = Buffer.alloc(4 * n); for (let i = 0; i < n; i++) b.writeUInt32LE(f(i), 4 * i); return b; };
  const doubles = (v: number[]) => { const b = Buffer.alloc(8 * v.length); v.forEach((x, i) => b.writeDoubleLE(x, 8 * i)); return b; };
  const shorts = (v: number[]) => { const b = Buffer.alloc(2 * v.length); v.forEach((x, i) => b.writeUInt16LE(x, 2 * i)); return b; };
  const SHORT = 3, LONG = 4, DOUBLE = 12;
  const nEntries = 14;
  const ifdBytes = 2 + nEntries * 12 + 4;
  const extras: Buffer[] = [];
  let extraOffset = 8 + ifdBytes;
  const rowBytes = width * 4;
  // offsets of the pixel rows are known once the header's length is: computed in a second pass below
  const offsetsAt = extraOffset;
  extraOffset += 4 * height;
  const countsAt = extraOffset;
  extraOffset += 4 * height;
  const scale = doubles([30, 30, 0]), tie = doubles([0, 0, 0, 500_000, 5_000_000, 0]);
  const geokeys = shorts([1, 1, 0, 3, 1024, 0, 1, 1, 1025, 0, 1, 1, 3072, 0, 1, 32633]);
  const headerLength = extraOffset + scale.length + tie.length + geokeys.length;
  entries.push([256, LONG, 1, width], [257, LONG, 1, height], [258, SHORT, 1, 32], [259, SHORT, 1, 1], [262, SHORT, 1, 1],
    [273, LONG, height, longs(height, (i) => headerLength + i * rowBytes)], [277, SHORT, 1, 1], [278, LONG, 1, 1],
    [279, LONG, height, longs(height, () => rowBytes)], [284, SHORT, 1, 1], [339, SHORT, 1, 3],
    [33550, DOUBLE, 3, scale], [33922, DOUBLE, 6, tie], [34735, SHORT, 16, geokeys]);
  const ifd = Buffer.alloc(ifdBytes);
  ifd.writeUInt16LE(nEntries, 0);
  let at = offsetsAt;
  entries.forEach(([tag, type, count, value], i) => {
    const o = 2 + 12 * i;
    ifd.writeUInt16LE(tag, o); ifd.writeUInt16LE(type, o + 2); ifd.writeUInt32LE(count, o + 4);
    if (Buffer.isBuffer(value)) { ifd.writeUInt32LE(at, o + 8); extras.push(value); at += value.length; }
    else if (type === SHORT) ifd.writeUInt16LE(value, o + 8);
    else ifd.writeUInt32LE(value, o + 8);
  });
  const head = Buffer.from([0x49, 0x49, 42, 0, 8, 0, 0, 0]);
  const out = Buffer.concat([head, ifd, ...extras]);
  expect(out.length).toBe(headerLength);
  return out;
}

interface Sent {
  status: number;
  body: string;
  bytesSent: number;
}

/** Streams `total` bytes (header, then zero chunks) and stops writing as soon as an answer arrives. */
function stream(total: number, head: Buffer, o: { declareLength: boolean; onChunk?: () => void }): Promise<Sent> {
  return new Promise((resolve, reject) => {
    const url = new URL(`${stack().url}/api/v1/datasets?filename=big.tif&epsg=32633`);
    const headers: Record<string, string | number> = { authorization: `Bearer ${key}`, "content-type": "image/tiff" };
    if (o.declareLength) headers["content-length"] = total;
    const req = http.request(url, { method: "POST", headers });
    let sent = 0, answered = false;
    const zeros = Buffer.alloc(CHUNK);
    req.on("response", (res) => {
      answered = true;
      let body = "";
      res.setEncoding("utf8");
      res.on("data", (c: string) => { body += c; });
      res.on("end", () => { resolve({ status: res.statusCode ?? 0, body, bytesSent: sent }); req.destroy(); });
    });
    req.on("error", (e) => { if (!answered) reject(e); });
    const pump = () => {
      while (!answered && sent < total) {
        const n = Math.min(sent === 0 ? head.length : CHUNK, total - sent);
        const chunk = sent === 0 ? head.subarray(0, n) : zeros.subarray(0, n);
        sent += n;
        o.onChunk?.();
        if (!req.write(chunk)) return void req.once("drain", pump);
      }
      if (!answered && sent >= total) req.end();
    };
    pump();
  });
}

describe("large uploads (issue 6)", () => {
  it("1 GiB streamed: accepted, with the server's RSS growing by less than 100 MB (proc(5) VmRSS)", async () => {
    const width = 16384, height = 16384;
    const head = tiffHeader(width, height);
    const total = head.length + width * height * 4;
    expect(total).toBeGreaterThan(GIB);
    // warm the route so its first compilation and pools are in the baseline
    await api("/api/v1/datasets?limit=1", { key });
    const pid = stack().webPid;
    const baseline = treeRssBytes(pid);
    let peak = baseline, chunks = 0;
    const t0 = Date.now();
    const res = await stream(total, head, { declareLength: true, onChunk: () => { if (++chunks % 64 === 0) peak = Math.max(peak, treeRssBytes(pid)); } });
    const seconds = (Date.now() - t0) / 1000;
    peak = Math.max(peak, treeRssBytes(pid));
    expect(res.status, res.body).toBe(201);
    const d = JSON.parse(res.body) as { id: string; sizeBytes: number; metadata: { width: number; height: number } };
    expect(d.sizeBytes).toBe(total);
    expect(d.metadata).toMatchObject({ width, height });
    const growthMb = (peak - baseline) / 1e6;
    console.log(`1 GiB upload: ${seconds.toFixed(1)} s (${(total / 1e6 / seconds).toFixed(0)} MB/s), server RSS ${(baseline / 1e6).toFixed(0)} → peak ${(peak / 1e6).toFixed(0)} MB`);
    expect(growthMb).toBeLessThan(100);
    expect((await api(`/api/v1/datasets/${d.id}`, { method: "DELETE", key })).status).toBe(204);
  });

  it("a declared Content-Length one byte over the limit → 413 before the body is sent (RFC 9110 §15.5.14)", async () => {
    const res = await stream(LIMIT + 1, tiffHeader(64, 64), { declareLength: true });
    expect(res.status).toBe(413);
    expect(res.bytesSent).toBeLessThan(LIMIT / 4);
  });

  it("a chunked body that crosses the limit → 413 as soon as it does, before the rest is sent; nothing staged or stored", async () => {
    const before = await countRows("SELECT count(*) AS n FROM datasets");
    const total = LIMIT + 256 * 1024 * 1024;
    const res = await stream(total, tiffHeader(64, 64), { declareLength: false });
    expect(res.status).toBe(413);
    expect(res.bytesSent).toBeGreaterThan(LIMIT);
    expect(res.bytesSent).toBeLessThan(total);
    expect(await countRows("SELECT count(*) AS n FROM datasets")).toBe(before);
  }, 300_000);
});
