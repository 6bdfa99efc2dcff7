import { afterAll, afterEach, beforeEach, describe, expect, it, vi, type MockInstance } from "vitest";
import { mkdtempSync, readFileSync, rmSync, writeFileSync } from "node:fs";
import { tmpdir } from "node:os";
import path from "node:path";
import { checkTiffLayout } from "@/lib/raster/tiff-structure";
import { inspectGeoTiff, readDem } from "@/lib/raster/read-geotiff";
import { RasterError } from "@/lib/raster/errors";
import { fixture } from "./gdal-reference";

// Hostile files from tests/fixtures/make-hostile-tiffs.py (derived: each breaks one TIFF 6.0 / BigTIFF
// rule) and unsupported ones written by GDAL. Each must end in a typed error within seconds, print
// nothing, and never hang or crash.
const HOSTILE: [file: string, code: RasterError["code"], detail: RegExp][] = [
  ["huge-declared.tif", "too-large", /100000 × 100000/],
  ["offset-past-eof.tif", "corrupt", /past the end/],
  ["truncated-tile.tif", "corrupt", /truncated/],
  ["short-deflate-stream.tif", "corrupt", /Deflate/],
  ["ifd-loop.tif", "corrupt", /loops/],
  ["ifd-loop-bigtiff.tif", "corrupt", /loops/],
  ["deflate-bomb.tif", "corrupt", /expands past/],
  ["zstd-bomb.tif", "corrupt", /expand past/],
  ["lzw-no-eoi.tif", "corrupt", /LZW/],
  ["png-named.tif", "not-tiff", /PNG/],
  ["old-jpeg.tif", "unsupported", /old-style JPEG/],
  ["rotated.tif", "rotated", /rotates/],
  ["crs-user-defined.tif", "crs-unknown", /user-defined.*epsg/],
  ["crs-absent.tif", "crs-missing", /epsg/],
  ["int64.tif", "unsupported", /64-bit integers/],
  ["complex.tif", "unsupported", /complex/],
  ["f64-predictor2.tif", "unsupported", /predictor/],
];

describe("readDem() on hostile and unsupported files", () => {
  let spies: MockInstance[] = [];
  beforeEach(() => {
    spies = (["log", "warn", "error", "info", "debug"] as const).map((m) => vi.spyOn(console, m));
  });
  afterEach(() => {
    for (const s of spies) s.mockRestore();
  });

  it.each(HOSTILE)("%s gives RasterError %s within seconds and prints nothing (derived)", async (file, code, detail) => {
    const err = await readDem(fixture(`hostile/${file}`)).catch((e: unknown) => e);
    expect(err).toBeInstanceOf(RasterError);
    expect((err as RasterError).code).toBe(code);
    expect((err as RasterError).detail).toMatch(detail);
    for (const s of spies) expect(s).not.toHaveBeenCalled();
  }, 5000);

  it("WebP (band 1 chosen) is refused as unsupported, naming WebP (geotiff.js has no WebP in Node)", async () => {
    await expect(readDem(fixture("hostile/webp.tif"), { band: 1 })).rejects.toMatchObject({ code: "unsupported", detail: expect.stringMatching(/WebP/) });
  }, 5000);

  it("the control file the broken ones derive from reads fine (derived)", async () => {
    const dem = await readDem(fixture("hostile/control.tif"));
    expect(dem.elevation.data.every((v) => v === 1)).toBe(true);
  });
});

describe("inspectGeoTiff() on the 100000 × 100000 declaration", () => {
  it("reports its size from the header alone when the budget allows it, allocating no pixels (derived)", async () => {
    const before = process.memoryUsage().rss;
    const info = await inspectGeoTiff(fixture("hostile/huge-declared.tif"), { cellBudget: 2e10 });
    expect([info.width, info.height]).toEqual([100000, 100000]);
    // 1e10 Float32 cells would be 40 GB; the call may grow the process by a few MB at most
    expect(process.memoryUsage().rss - before).toBeLessThan(100e6);
  });
});

describe("checkTiffLayout()", () => {
  it("refuses the 100000 × 100000 declaration from the header alone, for any budget below 1e10 cells (derived)", async () => {
    await expect(checkTiffLayout(fixture("hostile/huge-declared.tif"), 9_999_999_999)).rejects.toMatchObject({ code: "too-large" });
  });

  it("describes a tiled GDAL file: size, block grid and block count (derived from gdal_translate -co BLOCKXSIZE=32)", async () => {
    const l = await checkTiffLayout(fixture("variants/f32-DEFLATE-p2-tile.tif"), 1e9);
    expect([l.width, l.height, l.tiled, l.blockWidth, l.blockHeight, l.blockCount]).toEqual([97, 61, true, 32, 32, 8]);
    expect([l.compression, l.predictor, l.bitsPerSample[0], l.sampleFormat[0]]).toEqual([8, 2, 32, 3]);
  });

  it("reads BigTIFF headers and directories (BigTIFF layout, Aware Systems 2008)", async () => {
    const l = await checkTiffLayout(fixture("variants/bigtiff.tif"), 1e9);
    expect([l.bigTiff, l.width, l.height]).toEqual([true, 97, 61]);
  });
});

describe("readDem() on damaged copies of valid files", () => {
  // Derived invariant: whatever bytes are overwritten, the reader returns a grid or a RasterError,
  // prints nothing and stays fast. A fixed-seed generator makes the damage the same on every run.
  const sources = ["f32-LZW-p2-strip", "f32-DEFLATE-p3-tile", "f32-PACKBITS-p1-tile", "f32-ZSTD-p2-tile", "f32-LERC_DEFLATE-tile",
    "bigtiff", "i16-bigendian-LZW-p2", "bands-3-planar", "f32-NONE-p1-strip"];
  const dir = mkdtempSync(path.join(tmpdir(), "rillscale-damaged-"));
  afterAll(() => rmSync(dir, { recursive: true, force: true }));

  it.each(sources)("40 damaged copies of %s each end in a grid or a RasterError, silently, within seconds", async (name) => {
    let seed = 0x5eed + name.length;
    const random = () => (seed = (Math.imul(seed, 1103515245) + 12345) >>> 0) / 2 ** 32;
    const original = readFileSync(fixture(`variants/${name}.tif`));
    const warn = vi.spyOn(console, "warn");
    const log = vi.spyOn(console, "log");
    let failures = 0;
    for (let k = 0; k < 40; k++) {
      const bytes = Buffer.from(original);
      const nearHead = random() < 0.5; // half of the damage lands in the header and first directory
      for (let i = 0, n = 1 + Math.floor(random() * 8); i < n; i++) {
        bytes[Math.floor(random() * (nearHead ? Math.min(bytes.length, 600) : bytes.length))] = Math.floor(random() * 256);
      }
      const file = path.join(dir, `${name}-${k}.tif`);
      writeFileSync(file, bytes);
      try {
        await readDem(file, { band: name.startsWith("bands") ? 2 : undefined });
      } catch (err) {
        expect(err, `${file}: ${String(err)}`).toBeInstanceOf(RasterError);
        failures++;
      }
    }
    expect(warn).not.toHaveBeenCalled();
    expect(log).not.toHaveBeenCalled();
    warn.mockRestore();
    log.mockRestore();
    expect(failures).toBeGreaterThan(0); // the damage does reach the reader
  }, 20_000);
});
