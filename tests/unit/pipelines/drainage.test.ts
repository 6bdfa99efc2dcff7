import { describe, expect, it } from "vitest";
import { execFileSync } from "node:child_process";
import { existsSync, mkdtempSync, readFileSync } from "node:fs";
import { tmpdir } from "node:os";
import path from "node:path";
import { drainageParamsSchema, runDrainage, type DrainageArtifact, type DrainageParams } from "@/lib/pipelines/drainage";
import { readDem, type Dem } from "@/lib/raster/read-geotiff";
import { crsFromEpsg } from "@/lib/raster/crs";
import { makeGrid } from "@/lib/raster/grid";
import { projectedCellGeometry } from "@/lib/raster/cell-geometry";
import { writeGeoTiff } from "@/lib/raster/write-geotiff";
import { main as analyzeDrainage } from "@/scripts/analyze/drainage";
import { expectClose } from "@/tests/helpers/expect-close";
import { fixture } from "@/tests/unit/raster/gdal-reference";
import { countingSignal } from "@/tests/unit/hydro/counting-signal";
import { ABORT_CHECK_CELLS } from "@/lib/hydro/cancellation";
import { linearRegression } from "@/lib/stats/linear-regression";

const CELL_M = 10;
const UTM33 = crsFromEpsg(32633);

/** An in-memory DEM on 10 m UTM cells with its corner at (500000, 4000000). */
function demOf(z: Float32Array, width: number, height: number): Dem {
  return {
    elevation: makeGrid(z, width, height),
    georef: { crs: UTM33, transform: { originX: 500_000, originY: 4_000_000, pixelSizeX: CELL_M, pixelSizeY: CELL_M }, rasterType: "PixelIsArea" },
    cellGeometry: projectedCellGeometry(height, CELL_M, CELL_M),
    info: {
      width, height, bands: 1, dataType: "Float32", compression: "None", predictor: 1, tiled: false,
      tileWidth: width, tileHeight: 1, nodata: null, bboxLonLat: [15, 36, 15.01, 36.01], cellSizeM: [CELL_M, CELL_M],
    },
  };
}

/** A V-shaped valley along the middle column: sides drop 1 m per cell towards it, the floor 0.1 m per
 *  row towards the south edge. */
function vValley(size: number): Dem {
  const c = (size - 1) / 2, z = new Float32Array(size * size);
  for (let y = 0; y < size; y++) for (let x = 0; x < size; x++) z[y * size + x] = Math.abs(x - c) + 0.1 * (size - 1 - y);
  return demOf(z, size, size);
}

/**
 * Terrain grown upwards from the south edge: cells are reached in order of elevation and each new cell
 * stands a random 0.5–1.5 m above the cell that reached it, so every cell has a lower neighbour (no pit,
 * no flat) and ties in D8 are vanishingly unlikely. Seeded LCG (Numerical Recipes constants), so the
 * same seed gives the same surface.
 */
function grownTerrain(size: number, seed: number): Dem {
  let state = seed >>> 0;
  const random = () => ((state = (Math.imul(state, 1664525) + 1013904223) >>> 0) / 2 ** 32);
  const n = size * size, z = new Float32Array(n).fill(NaN), open: number[] = [];
  for (let x = 0; x < size; x++) { z[(size - 1) * size + x] = random(); open.push((size - 1) * size + x); }
  while (open.length > 0) {
    let best = 0;
    for (let i = 1; i < open.length; i++) if (z[open[i]] < z[open[best]]) best = i;
    const c = open[best];
    open[best] = open[open.length - 1]; open.pop();
    const cx = c % size, cy = (c - cx) / size;
    for (let dy = -1; dy <= 1; dy++) for (let dx = -1; dx <= 1; dx++) {
      const nx = cx + dx, ny = cy + dy;
      if ((dx || dy) && nx >= 0 && ny >= 0 && nx < size && ny < size && Number.isNaN(z[ny * size + nx])) {
        z[ny * size + nx] = z[c] + 0.5 + random();
        open.push(ny * size + nx);
      }
    }
  }
  return demOf(z, size, size);
}

/** The same surface turned 90° clockwise: new (x, y) = (H − 1 − y, x). */
function rotated(dem: Dem): Dem {
  const { data, width: w, height: h } = dem.elevation;
  const out = new Float32Array(w * h);
  for (let y = 0; y < h; y++) for (let x = 0; x < w; x++) out[x * h + (h - 1 - y)] = data[y * w + x];
  return demOf(out, h, w);
}

const tmp = () => mkdtempSync(path.join(tmpdir(), "drainage-test-"));
const gdalJson = (file: string) => JSON.parse(execFileSync("gdalinfo", ["-json", file], { encoding: "utf8" }));

describe("runDrainage() on a tilted V-valley", () => {
  const size = 41;
  const params: DrainageParams = { channelThreshold: { method: "area", km2: 0.003 } };

  it("drains the whole grid to one outlet and finds one order-1 stream along the floor (derived)", async () => {
    // hillslope cells run straight across to the floor (1 m over 10 m beats 1.1 m over 14.1 m) in
    // lines of at most 20 cells, under the 30-cell threshold, while the floor's first cell already
    // drains its 41-cell row: the floor, and only the floor, is a channel from row 0 to row 40
    const { summary, artifacts } = await runDrainage({ dem: vValley(size), outDir: tmp() }, params);
    expect(summary.network.outlets).toBe(1);
    expect(summary.network.links).toBe(1);
    const link = JSON.parse(new TextDecoder().decode(artifacts.find((a) => a.name === "streams.geojson")!.bytes!)).features[0].properties;
    expectClose(link.lengthM, 40 * CELL_M, 1e-9);
    expectClose(link.dropM, 4, 1e-4); // 40 rows × 0.1 m, in Float32 elevations
    expectClose(link.slope, 0.01, 1e-6);
    expect(summary.horton.highestOrder).toBe(1);
    expect(summary.horton.bifurcationRatio).toBeNull(); // one order gives no line
    // everything drains to the floor's last cell: 41 × 41 cells of 100 m²
    expectClose(summary.basins.list[0].areaKm2, (size * size * CELL_M * CELL_M) / 1e6, 1e-12);
    expect(summary.basins.list[0].outletCol).toBe(20);
    expect(summary.basins.list[0].outletRow).toBe(40);
    expect(summary.conditioning.cellsRaised).toBe(0);
  });

  it("labels every cell with the one basin, whose cells add up to the outlet's area (invariant)", async () => {
    const outDir = tmp();
    const { summary, artifacts } = await runDrainage({ dem: vValley(size), outDir }, params);
    const basins = await readDem(artifacts.find((a) => a.name === "basins.tif")!.path!);
    const labelled = Array.from(basins.elevation.data).filter((v) => v === 1).length;
    expectClose(labelled * CELL_M * CELL_M / 1e6, summary.drainageDensity.basinAreaKm2, 1e-12);
    expect(labelled).toBe(size * size);
  });

  it("snaps a user outlet 15 m beside the floor onto it (common practice)", async () => {
    const x = 500_000 + 21.5 * CELL_M, y = 4_000_000 - 40.5 * CELL_M; // the centre of cell (21, 40)
    const { summary } = await runDrainage({ dem: vValley(size), outDir: tmp() },
      { ...params, basins: { mode: "outlets", points: [{ x: x + 5, y }], snapRadiusM: 20 } });
    expect(summary.basins.list[0].outletCol).toBe(20);
    expect(summary.basins.list[0].outletRow).toBe(40);
  });
});

describe("runDrainage() on grown terrain", () => {
  const params: DrainageParams = { channelThreshold: { method: "area", km2: 0.0015 } };

  it("gives the same Horton table when the DEM is turned by 90° (invariant)", async () => {
    const dem = grownTerrain(48, 7);
    const a = await runDrainage({ dem, outDir: tmp() }, params);
    const b = await runDrainage({ dem: rotated(dem), outDir: tmp() }, params);
    expect(a.summary.horton.highestOrder).toBeGreaterThanOrEqual(3);
    expect(b.summary.horton.table.map((r) => r.streamCount)).toEqual(a.summary.horton.table.map((r) => r.streamCount));
    a.summary.horton.table.forEach((r, i) => {
      expectClose(b.summary.horton.table[i].meanLengthM, r.meanLengthM, 1e-9);
      expectClose(b.summary.horton.table[i].meanAreaKm2, r.meanAreaKm2, 1e-12);
    });
    expectClose(b.summary.horton.bifurcationRatio!.value, a.summary.horton.bifurcationRatio!.value, 1e-12);
  });

  it("accumulates exactly the valid area at the outlets, around a hole of nodata too (invariant)", async () => {
    const dem = grownTerrain(40, 3);
    for (let y = 15; y < 20; y++) for (let x = 15; x < 20; x++) dem.elevation.data[y * 40 + x] = NaN;
    // with a one-cell threshold every outlet cell ends a network outlet link carrying its whole basin
    const { summary, artifacts } = await runDrainage({ dem, outDir: tmp() }, { ...params, channelThreshold: { method: "area", km2: 1e-4 } });
    expectClose(summary.drainageDensity.basinAreaKm2, ((40 * 40 - 25) * CELL_M * CELL_M) / 1e6, 1e-12);
    expect(summary.input.validCells).toBe(40 * 40 - 25);
    const basins = await readDem(artifacts.find((a) => a.name === "basins.tif")!.path!);
    expect(Array.from(basins.elevation.data).filter((v) => v > 0)).toHaveLength(40 * 40 - 25);
  });

  it("returns the same summary on every run (deterministic, no timings inside)", async () => {
    const dem = grownTerrain(32, 11);
    const a = await runDrainage({ dem, outDir: tmp() }, params);
    const b = await runDrainage({ dem, outDir: tmp() }, params);
    expect(JSON.stringify(a.summary)).toBe(JSON.stringify(b.summary));
    expect(JSON.stringify(a.summary)).not.toMatch(/timing|seconds/i);
    expect(a.timingsS.fill).toBeGreaterThanOrEqual(0);
  });

  it("reports its stages in order with rising fractions ending at 1", async () => {
    const seen: [string, number][] = [];
    await runDrainage({ dem: grownTerrain(24, 5), outDir: tmp() }, params, { onProgress: (s, f) => seen.push([s, f]) });
    const fractions = seen.map(([, f]) => f);
    expect(fractions.every((f, i) => i === 0 || f >= fractions[i - 1])).toBe(true);
    expect(seen.map(([s]) => s)).toEqual(["read", "fill", "flats", "directions", "accumulation", "channels", "network", "analysis", "artifacts", "done"]);
    expect(fractions.at(-1)).toBe(1);
  });

  it("stops with the signal's reason when cancelled between stages", async () => {
    const controller = new AbortController();
    const run = runDrainage({ dem: grownTerrain(24, 5), outDir: tmp() }, params, {
      signal: controller.signal,
      onProgress: (s) => { if (s === "directions") controller.abort(new Error("cancelled by test")); },
    });
    await expect(run).rejects.toThrow("cancelled by test");
  });

  it("chooses a threshold by the constant drop test and shows every candidate's t", async () => {
    const { summary } = await runDrainage({ dem: grownTerrain(48, 7), outDir: tmp() },
      { channelThreshold: { method: "constant-drop", minKm2: 0.0005, maxKm2: 0.01, candidates: 6 } });
    const cd = summary.channels.constantDrop!;
    expect(cd.candidates).toHaveLength(6);
    const first = cd.candidates.findIndex((c) => c.passes);
    expect(summary.channels.thresholdKm2).toBe(cd.candidates[first].thresholdKm2);
    expect(cd.candidates.slice(0, first).every((c) => !c.passes)).toBe(true);
  });

  it("writes streams as RFC 7946 GeoJSON in lon/lat with order, magnitude, length, area and slope", async () => {
    const { artifacts, summary } = await runDrainage({ dem: grownTerrain(32, 11), outDir: tmp() }, params);
    const geo = JSON.parse(new TextDecoder().decode(artifacts.find((a) => a.name === "streams.geojson")!.bytes!));
    expect(geo.type).toBe("FeatureCollection");
    expect(geo.crs).toBeUndefined(); // RFC 7946 §4: no crs member
    expect(geo.features).toHaveLength(summary.network.links);
    const f = geo.features[0];
    expect(f.geometry.type).toBe("LineString");
    expect(Object.keys(f.properties)).toEqual(expect.arrayContaining(["order", "magnitude", "lengthM", "areaM2", "slope"]));
    // UTM 33N, 500 km east: on the central meridian 15°E, near 36.1°N
    const [lon, lat] = f.geometry.coordinates[0];
    expectClose(lon, 15, 0.01);
    expectClose(lat, 36.14, 0.02);
  });

  it("writes GeoTIFFs that gdalinfo reads with the input's CRS and extent", async () => {
    const { artifacts } = await runDrainage({ dem: grownTerrain(32, 11), outDir: tmp() }, params);
    for (const name of ["flow-accumulation.tif", "strahler-order.tif", "basins.tif"]) {
      const info = gdalJson(artifacts.find((a) => a.name === name)!.path!);
      expect(info.size).toEqual([32, 32]);
      expect(info.geoTransform).toEqual([500_000, CELL_M, 0, 4_000_000, 0, -CELL_M]);
      expect(info.stac["proj:epsg"]).toBe(32633);
    }
  });
});

describe("runDrainage() basin choice", () => {
  it("analyses only the largest basin when asked, and labels only its cells (invariant: labels add up to its area)", async () => {
    const dem = grownTerrain(40, 3);
    const all = await runDrainage({ dem, outDir: tmp() }, { channelThreshold: { method: "area", km2: 0.0015 } });
    const one = await runDrainage({ dem, outDir: tmp() }, { channelThreshold: { method: "area", km2: 0.0015 }, basins: { mode: "largest", count: 1 } });
    expect(one.summary.basins.count).toBe(1);
    expect(one.summary.network.outlets).toBe(1);
    expect(one.summary.network.links).toBeLessThan(all.summary.network.links);
    expect(one.summary.basins.list[0].areaKm2).toBe(all.summary.basins.list[0].areaKm2); // lists are largest first
    const labels = await readDem(one.artifacts.find((a) => a.name === "basins.tif")!.path!);
    const cells = Array.from(labels.elevation.data).filter((v) => v === 1).length;
    expectClose((cells * CELL_M * CELL_M) / 1e6, one.summary.basins.list[0].areaKm2, 1e-12);
  });
});

describe("npm run analyze -- drainage", () => {
  it("writes summary.json, timings.json and every artifact into --out and exits 0", async () => {
    const dir = tmp(), demPath = path.join(dir, "dem.tif"), out = path.join(dir, "out");
    const dem = grownTerrain(32, 11);
    await writeGeoTiff(demPath, dem.elevation, dem.georef);
    expect(await analyzeDrainage([demPath, "--threshold-km2", "0.0015", "--out", out, "--quiet"])).toBe(0);
    for (const f of ["summary.json", "timings.json", "streams.geojson", "flow-accumulation.tif", "strahler-order.tif", "basins.tif"]) {
      expect(existsSync(path.join(out, f)), f).toBe(true);
    }
    const summary = JSON.parse(readFileSync(path.join(out, "summary.json"), "utf8"));
    expect(summary.channels.thresholdKm2).toBe(0.0015);
    expect(summary.input.crs.epsg).toBe(32633);
  });
  it("exits 2 with the usage on a missing DEM path or on both threshold options", async () => {
    expect(await analyzeDrainage([])).toBe(2);
    expect(await analyzeDrainage(["x.tif", "--threshold-km2", "1", "--auto-threshold"])).toBe(2);
    expect(await analyzeDrainage(["x.tif", "--threshold-km2", "many"])).toBe(2);
  });
  it("exits 1 with the reason when the DEM cannot be read", async () => {
    expect(await analyzeDrainage([path.join(tmp(), "missing.tif"), "--out", tmp(), "--quiet"])).toBe(1);
  });
});

describe("drainageParamsSchema", () => {
  it("fills the defaults and refuses a negative threshold", () => {
    const p = drainageParamsSchema.parse({});
    expect(p.channelThreshold).toEqual({ method: "area", km2: 1 });
    expect(p.basins).toEqual({ mode: "all" });
    expect(p.confidence).toBe(0.95);
    expect(drainageParamsSchema.safeParse({ channelThreshold: { method: "area", km2: -1 } }).success).toBe(false);
    expect(drainageParamsSchema.safeParse({ confidence: 1.5 }).success).toBe(false);
  });
  it("describes every field with its unit or meaning, for the OpenAPI document", () => {
    for (const [key, field] of Object.entries(drainageParamsSchema.shape)) {
      expect(field.description, key).toBeTruthy();
    }
  });
});

// never skipped: a missing fixture fails here with a message naming tests/fixtures/fetch.sh (fixtures README)
describe("runDrainage() on the Jacksboro fault DEM (tests/fixtures/fetch.sh)", () => {
  const jacksboro = () => fixture("debian/jacksboro.tif"); // resolved inside each test, so only these fail
  it("at 0.35 km² gives R_B and R_L in the natural ranges and D in [1.5, 2]", async () => {
    const { summary } = await runDrainage({ demPath: jacksboro(), outDir: tmp() }, { channelThreshold: { method: "area", km2: 0.35 } });
    const rb = summary.horton.bifurcationRatio!.value, rl = summary.horton.lengthRatio!.value;
    expect(rb).toBeGreaterThanOrEqual(3); // R_B 3–5 (confirmed in secondary sources; Werner 1970)
    expect(rb).toBeLessThanOrEqual(5);
    expect(rl).toBeGreaterThanOrEqual(1.5); // R_L 1.5–3.5 (from memory; Strahler 1964)
    expect(rl).toBeLessThanOrEqual(3.5);
    expect(summary.dimension!.raw).toBeGreaterThanOrEqual(1.5); // D in [1.5, 2]: the issue's bound (common practice)
    expect(summary.dimension!.raw).toBeLessThanOrEqual(2);
  });
  it("writes GeoTIFFs with the input's CRS and extent, as gdalinfo reads them", async () => {
    const { artifacts } = await runDrainage({ demPath: jacksboro(), outDir: tmp() }, { channelThreshold: { method: "area", km2: 0.35 } });
    const input = gdalJson(jacksboro());
    for (const a of artifacts.filter((x) => x.path)) {
      const info = gdalJson(a.path!);
      expect(info.size).toEqual(input.size);
      info.geoTransform.forEach((v: number, i: number) => expectClose(v, input.geoTransform[i], 1e-9));
      expect(info.stac["proj:epsg"]).toBe(input.stac["proj:epsg"]);
      expect(info.cornerCoordinates).toEqual(input.cornerCoordinates);
    }
    expect(readFileSync(artifacts.find((a) => a.name === "strahler-order.tif")!.path!).length).toBeGreaterThan(0);
  });
});

describe("runDrainage() zFactor", () => {
  it("refuses a zero, negative or NaN zFactor with an issue naming the field (a negative one turns the DEM upside down; derived)", async () => {
    for (const zFactor of [0, -1, Number.NaN, Number.POSITIVE_INFINITY]) {
      const r = drainageParamsSchema.safeParse({ zFactor });
      expect(r.success, String(zFactor)).toBe(false);
      expect(r.error!.issues.map((i) => i.path.join("."))).toContain("zFactor");
      await expect(runDrainage({ demPath: "unused.tif", outDir: tmp() }, { zFactor })).rejects.toThrow(/zFactor/);
    }
    expect(drainageParamsSchema.shape.zFactor.description).toMatch(/> 0/);
  });

  it("with zFactor 2 doubles every link's drop and slope and leaves orders, counts and lengths as they were (derived: D8, the fill and the flats are unchanged by a positive scale)", async () => {
    const dir = tmp(), demPath = path.join(dir, "dem.tif");
    const dem = grownTerrain(32, 11);
    await writeGeoTiff(demPath, dem.elevation, dem.georef);
    const params: DrainageParams = { channelThreshold: { method: "area", km2: 0.0015 } };
    const links = (a: DrainageArtifact[]) =>
      JSON.parse(new TextDecoder().decode(a.find((x) => x.name === "streams.geojson")!.bytes!)).features.map((f: { properties: Record<string, number> }) => f.properties);
    const one = await runDrainage({ demPath, outDir: tmp() }, params);
    const two = await runDrainage({ demPath, outDir: tmp() }, { ...params, zFactor: 2 });
    const a = links(one.artifacts), b = links(two.artifacts);
    expect(a.length).toBeGreaterThan(5);
    expect(b).toHaveLength(a.length);
    expect(a.some((p: Record<string, number>) => p.dropM > 0)).toBe(true);
    a.forEach((p: Record<string, number>, i: number) => {
      expect(b[i].order).toBe(p.order);
      expect(b[i].magnitude).toBe(p.magnitude);
      expectClose(b[i].lengthM, p.lengthM, 1e-12);
      expectClose(b[i].dropM, 2 * p.dropM, 1e-9); // × 2 is exact in Float32
      if (p.slope !== null) expectClose(b[i].slope, 2 * p.slope, 1e-9);
    });
    expect(two.summary.horton.table.map((r) => r.streamCount)).toEqual(one.summary.horton.table.map((r) => r.streamCount));
    one.summary.horton.table.forEach((r, i) => expectClose(two.summary.horton.table[i].meanLengthM, r.meanLengthM, 1e-12));
  });
});

describe("runDrainage() cancelled inside a stage", () => {
  it("stops inside the fill's loop, before the next stage, with the signal's reason (derived: ABORT_CHECK_CELLS)", async () => {
    // just over two check periods of cells, so the fill's loop checks the signal at least twice
    const side = Math.ceil(Math.sqrt(2.1 * ABORT_CHECK_CELLS));
    const dem = grownTerrain(64, 5);
    const big = new Float32Array(side * side);
    for (let y = 0; y < side; y++) for (let x = 0; x < side; x++) big[y * side + x] = dem.elevation.data[(y % 64) * 64 + (x % 64)] + 0.01 * y;
    const probe = countingSignal();
    let armedAt = -1;
    const stages: string[] = [];
    const run = runDrainage({ dem: demOf(big, side, side), outDir: tmp() }, { channelThreshold: { method: "area", km2: 1 } }, {
      signal: probe.signal,
      onProgress: (s) => {
        stages.push(s);
        // after the first stage ("read") hands over to "fill": its entry check, then the first in-loop check aborts
        if (s === "fill") { armedAt = probe.checks; probe.abortAt = probe.checks + 2; }
      },
    });
    await expect(run).rejects.toThrow(probe.reason);
    expect(armedAt).toBeGreaterThan(0);
    expect(probe.checks).toBe(armedAt + 2);
    expect(probe.stackAtAbort).toMatch(/priorityFlood/); // the check was the fill's own, not the stage boundary's
    expect(stages).toEqual(["read", "fill"]);
  });
});

describe("runDrainage() options", () => {
  const params: DrainageParams = { channelThreshold: { method: "area", km2: 0.0015 } };
  const streams = (a: DrainageArtifact[]) =>
    JSON.parse(new TextDecoder().decode(a.find((x) => x.name === "streams.geojson")!.bytes!)).features.map((f: { properties: { areaM2: number } }) => f.properties);

  it("epsilonFill says so in the summary, raises a plateau by at most its side × one Float32 step and still accumulates exactly the valid area (derived; invariant)", async () => {
    // a stepped pyramid, z = cells to the nearest edge, cut off at 17: every cell off the top has a lower
    // neighbour towards the edge, and the top is a 6 × 6 plateau whose 4 × 4 inner cells are flat.
    // Flat resolution leaves it as it is; the epsilon fill lifts each inner cell by one Float32 step per
    // cell of distance from the rim, so by less than the plateau's side (6) steps.
    const size = 40, z = new Float32Array(size * size);
    for (let y = 0; y < size; y++) for (let x = 0; x < size; x++) z[y * size + x] = Math.min(x, y, size - 1 - x, size - 1 - y, 17);
    const dem = demOf(z, size, size);
    const step = 2 ** (Math.floor(Math.log2(17)) - 23); // one unit in the last place of a Float32 at 17 m
    const oneCell = { channelThreshold: { method: "area", km2: 1e-4 } } as const; // every outlet cell ends a link
    const flat = await runDrainage({ dem, outDir: tmp() }, oneCell);
    const eps = await runDrainage({ dem, outDir: tmp() }, { ...oneCell, epsilonFill: true });
    expect(flat.summary.conditioning.method).toBe("priority-flood-with-flat-resolution");
    expect(flat.summary.conditioning.cellsRaised).toBe(0); // Barnes et al. 2014: flats resolved without altering elevations
    expect(flat.summary.conditioning.flatCells).toBe(16); // the plateau's 4 × 4 inner cells
    expect(flat.summary.conditioning.flats).toBe(1);
    expect(eps.summary.conditioning.method).toBe("priority-flood-epsilon");
    expect(eps.summary.conditioning.flatCells).toBe(0);
    expect(eps.summary.conditioning.cellsRaised).toBe(16);
    expect(eps.summary.conditioning.maxRaiseM).toBeGreaterThan(0);
    expect(eps.summary.conditioning.maxRaiseM).toBeLessThanOrEqual(6 * step); // flat length × ε (derived)
    for (const run of [flat, eps]) {
      expect(run.summary.input.validCells).toBe(size * size);
      expectClose(run.summary.drainageDensity.basinAreaKm2, (size * size * CELL_M * CELL_M) / 1e6, 1e-12); // invariant
    }
  });

  it("excludeHighestOrder fits one order fewer, and R_B is the least-squares fit of ln N on order over the rest (derived)", async () => {
    const dem = grownTerrain(48, 7);
    const all = await runDrainage({ dem, outDir: tmp() }, params);
    const cut = await runDrainage({ dem, outDir: tmp() }, { ...params, excludeHighestOrder: true });
    const top = all.summary.horton.highestOrder;
    expect(top).toBeGreaterThanOrEqual(3); // the cut fit needs at least two orders left after the top one is set aside (derived)
    expect(cut.summary.horton.table).toEqual(all.summary.horton.table); // the table keeps every order
    expect(all.summary.horton.ordersUsed).toHaveLength(top);
    expect(cut.summary.horton.ordersUsed).toHaveLength(top - 1);
    expect(cut.summary.horton.bifurcationRatio!.ordersUsed).toEqual(all.summary.horton.bifurcationRatio!.ordersUsed.slice(0, -1));
    const rb = (rows: { order: number; streamCount: number }[]) =>
      Math.exp(-linearRegression(rows.map((r) => r.order), rows.map((r) => Math.log(r.streamCount))).slope);
    const table = all.summary.horton.table;
    expectClose(all.summary.horton.bifurcationRatio!.value, rb(table), 1e-12);
    expectClose(cut.summary.horton.bifurcationRatio!.value, rb(table.slice(0, -1)), 1e-12);
    expect(cut.summary.horton.bifurcationRatio!.value).not.toBe(all.summary.horton.bifurcationRatio!.value);
    // by hand over orders 1 and 2 alone: the line through two points has slope ln N₂ − ln N₁, so R_B = N₁/N₂ (derived)
    expectClose(rb(table.slice(0, 2)), table[0].streamCount / table[1].streamCount, 1e-12);
    // by hand over the orders below the top one, whatever their number: the closed-form least-squares slope
    // Σ(x − x̄)(y − ȳ) / Σ(x − x̄)², which for two orders is the N₁/N₂ above (derived)
    const kept = table.slice(0, top - 1);
    const xs = kept.map((r) => r.order);
    const ys = kept.map((r) => Math.log(r.streamCount));
    const mx = xs.reduce((a, b) => a + b, 0) / xs.length;
    const my = ys.reduce((a, b) => a + b, 0) / ys.length;
    const slope = xs.reduce((a, x, i) => a + (x - mx) * (ys[i] - my), 0) / xs.reduce((a, x) => a + (x - mx) ** 2, 0);
    expectClose(cut.summary.horton.bifurcationRatio!.value, Math.exp(-slope), 1e-12);
  });

  it("hackMinAreaKm2 fits only the sub-basins at least that large: fewer as the bound rises, one per link above it (derived)", async () => {
    const dem = grownTerrain(48, 7);
    const bounds = [0, 0.002, 0.005, 0.01, 0.02];
    const runs = await Promise.all(bounds.map((b) => runDrainage({ dem, outDir: tmp() }, { ...params, hackMinAreaKm2: b })));
    const fitted = runs.map((r) => r.summary.hack?.pointsFitted ?? 0);
    const links = streams(runs[0].artifacts);
    fitted.forEach((n, i) => {
      if (i > 0) expect(n, `bound ${bounds[i]}`).toBeLessThanOrEqual(fitted[i - 1]);
      if (runs[i].summary.hack) {
        expect(n).toBe(links.filter((l: { areaM2: number }) => l.areaM2 >= bounds[i] * 1e6).length);
        expect(runs[i].summary.hack!.minAreaKm2).toBeGreaterThanOrEqual(bounds[i]);
      }
    });
    expect(fitted[0]).toBe(runs[0].summary.network.links); // bound 0: every link with an area
    expect(fitted.at(-1)!).toBeLessThan(fitted[0]);
  });
});
