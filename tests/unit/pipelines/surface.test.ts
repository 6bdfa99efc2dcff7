import { describe, expect, it } from "vitest";
import { mkdtemp, rm } from "node:fs/promises";
import { tmpdir } from "node:os";
import path from "node:path";
import { runSurface, surfaceParamsSchema } from "@/lib/pipelines/surface";
import { fbmSurface } from "@/lib/fractal/synth/fbm-surface";
import { projectedCellGeometry } from "@/lib/raster/cell-geometry";
import { crsFromEpsg } from "@/lib/raster/crs";
import { readDem, type Georeference } from "@/lib/raster/read-geotiff";
import { writeGeoTiff } from "@/lib/raster/write-geotiff";
import { expectClose } from "@/tests/helpers/expect-close";

const georef: Georeference = {
  crs: crsFromEpsg(32632),
  transform: { originX: 500000, originY: 5000000, pixelSizeX: 30, pixelSizeY: 30 },
  rasterType: "PixelIsArea",
};
const grid = fbmSurface({ hurst: 0.5, seed: 11, size: 256 });
const dem = { elevation: grid, cellGeometry: projectedCellGeometry(256, 30, 30), georef };

describe("runSurface()", () => {
  it("reports every estimator with its evidence and writes the local dimension map with the input's georeferencing, step × the cell size (derived)", async () => {
    const outDir = await mkdtemp(path.join(tmpdir(), "surface-test-"));
    try {
      const stages: string[] = [];
      const { summary, artifacts } = await runSurface({ dem, outDir }, { localWindowCells: 32, localStepCells: 32 }, { onProgress: (s) => stages.push(s) });
      expect(summary.dimensions.map((d) => d.estimator)).toEqual([
        "variogram", "variogram E-W", "variogram N-S", "variogram NW-SE", "variogram SW-NE",
        "cube counting (true-units)", "power spectrum", "triangular prism",
      ]);
      for (const d of summary.dimensions) {
        expect(d.D).toBeGreaterThan(1.9);
        expect(d.D).toBeLessThan(3.1);
        expect(d.ci95[0]).toBeLessThanOrEqual(d.D);
      }
      expect(stages[stages.length - 1]).toBe("done");
      expect(artifacts.map((a) => a.name)).toEqual(["local-dimension.tif"]);
      const map = await readDem(artifacts[0].path);
      expect([map.elevation.width, map.elevation.height]).toEqual([8, 8]);
      expect(map.georef.transform).toEqual({ originX: 500000, originY: 5000000, pixelSizeX: 960, pixelSizeY: 960 });
      expect(map.georef.crs.epsg).toBe(32632);
      const local = summary.estimators.localDimension as { summary: { mean: number } };
      expectClose(map.elevation.data.reduce((a, b) => a + b, 0) / 64, local.summary.mean, 1e-4);
    } finally {
      await rm(outDir, { recursive: true, force: true });
    }
  });

  it("gives a byte-identical summary on a second run (determinism, derived)", async () => {
    const params = { estimators: ["variogram", "cube-counting", "profiles"] as ("variogram" | "cube-counting" | "profiles")[] };
    const a = await runSurface({ dem }, params);
    const b = await runSurface({ dem }, params);
    expect(JSON.stringify(a.summary)).toBe(JSON.stringify(b.summary));
    expect(JSON.stringify(a.summary)).not.toMatch(/timings/);
  });

  it("reads a GeoTIFF path and gives the same D as the grid in memory (invariant, derived)", async () => {
    const dir = await mkdtemp(path.join(tmpdir(), "surface-test-"));
    try {
      const file = path.join(dir, "dem.tif");
      await writeGeoTiff(file, grid, georef, { nodata: -9999 });
      const fromFile = await runSurface({ demPath: file }, { estimators: ["variogram", "power-spectrum"] });
      const inMemory = await runSurface({ dem }, { estimators: ["variogram", "power-spectrum"] });
      expect(fromFile.summary.dimensions.map((d) => d.D)).toEqual(inMemory.summary.dimensions.map((d) => d.D));
      expect(fromFile.summary.input.crs).toEqual({ epsg: 32632, name: georef.crs.name });
    } finally {
      await rm(dir, { recursive: true, force: true });
    }
  });

  it("applies a user scaling range in metres to every fit (derived)", async () => {
    const { summary } = await runSurface({ dem }, { estimators: ["variogram"], scalingRange: { minM: 60, maxM: 1000 } });
    for (const d of summary.dimensions) {
      expect(d.rangeMinM).toBeGreaterThanOrEqual(60);
      expect(d.rangeMaxM).toBeLessThanOrEqual(1000);
    }
  });

  it("stops when its signal is aborted", async () => {
    const controller = new AbortController();
    controller.abort();
    await expect(runSurface({ dem }, {}, { signal: controller.signal })).rejects.toThrow();
  });
});

describe("surfaceParamsSchema", () => {
  it("fills the documented defaults and refuses out-of-bounds values", () => {
    const p = surfaceParamsSchema.parse({});
    expect(p.cubeNormalisation).toBe("true-units");
    expect(p.localWindowCells).toBe(64);
    expect(surfaceParamsSchema.safeParse({ lagCount: 2 }).success).toBe(false);
    expect(surfaceParamsSchema.safeParse({ scalingRange: { minM: 100, maxM: 50 } }).success).toBe(false);
  });
});
