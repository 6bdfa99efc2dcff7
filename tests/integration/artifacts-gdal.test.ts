// Every GeoTIFF artifact, downloaded over the API, read by GDAL (Debian's gdal-bin, `gdalinfo -json -stats -hist`)
// as the reference reader nobody here wrote: it opens, carries the input's CRS, geotransform, corners and size as
// GDAL reports them for the input file, declares its nodata, and its statistics agree with the job's own summary.
import { execFile } from "node:child_process";
import { mkdtemp, rm, writeFile } from "node:fs/promises";
import { tmpdir } from "node:os";
import path from "node:path";
import { promisify } from "node:util";
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { expectClose } from "@/tests/helpers/expect-close";
import { ADMIN, api, createKey, signIn } from "@/tests/integration/client";
import { finished, fixture, uploadOk, submitOk, waitForJob } from "@/tests/integration/data-helpers";

const run = promisify(execFile);
const M2_PER_KM2 = 1e6;

/** The parts of `gdalinfo -json` (GDAL 3.6) read here; NaN nodata is the string "NaN" there. */
interface GdalInfo {
  driverShortName: string;
  size: [number, number];
  geoTransform: number[];
  coordinateSystem: { wkt: string };
  cornerCoordinates: Record<string, [number, number]>;
  metadata: { ""?: Record<string, string> };
  stac?: { "proj:epsg"?: number | null };
  bands: {
    type: string;
    noDataValue?: number | string;
    /** `-stats` results at full precision (the band's minimum/maximum fields are rounded to 3 decimals) */
    metadata: { ""?: { STATISTICS_MINIMUM?: string; STATISTICS_MAXIMUM?: string; STATISTICS_MEAN?: string } };
    histogram?: { min: number; max: number; count: number; buckets: number[] };
  }[];
}

/** gdalinfo with PAM off, so `-stats` writes no .aux.xml beside the file. */
async function gdalinfo(file: string, extra: string[] = []): Promise<GdalInfo> {
  const { stdout } = await run("gdalinfo", ["-json", ...extra, file], { env: { ...process.env, GDAL_PAM_ENABLED: "NO" }, maxBuffer: 16 << 20 });
  return JSON.parse(stdout) as GdalInfo;
}

/** GDAL's statistics of band 1 as numbers. */
function statsOf(info: GdalInfo) {
  const m = info.bands[0].metadata[""] ?? {};
  return { min: Number(m.STATISTICS_MINIMUM), max: Number(m.STATISTICS_MAXIMUM), mean: Number(m.STATISTICS_MEAN) };
}

/** Histogram totals: pixels counted, and how many buckets hold any (= distinct integers while each has its own). */
function histogramOf(info: GdalInfo) {
  const h = info.bands[0].histogram!;
  return { total: h.buckets.reduce((a, b) => a + b, 0), filled: h.buckets.filter((c) => c > 0).length, h };
}

let key = "";
let workDir = "";
const inputs = {
  jacksboro: { fixture: "debian/jacksboro.tif", params: { channelThreshold: { method: "area", km2: 2 } } },
  elev: { fixture: "debian/elev.tif", params: {} },
} as const;
type InputName = keyof typeof inputs;
const datasetIds = {} as Record<InputName, string>;
const inputInfo = {} as Record<InputName, GdalInfo>;

interface Artifact { name: string; mediaType: string }

/** Runs a job to success and downloads each GeoTIFF artifact into the work directory. */
async function runAndDownload(dataset: string, kind: string, params: unknown, label: string) {
  const job = await submitOk(key, { dataset, kind, params });
  const done = await waitForJob(key, job.id, finished);
  expect(done.status, JSON.stringify(done.error)).toBe("succeeded");
  const summary = ((await (await api(`/api/v1/jobs/${job.id}/result`, { key })).json()) as { summary: Record<string, unknown> }).summary;
  const listed = ((await (await api(`/api/v1/jobs/${job.id}/artifacts`, { key })).json()) as { items: Artifact[] }).items;
  const tiffs = listed.filter((a) => a.mediaType.startsWith("image/tiff"));
  const files: Record<string, string> = {};
  for (const a of tiffs) {
    const res = await api(`/api/v1/jobs/${job.id}/artifacts/${a.name}`, { key });
    expect(res.status).toBe(200);
    files[a.name] = path.join(workDir, `${label}-${a.name}`);
    await writeFile(files[a.name], new Uint8Array(await res.arrayBuffer()));
  }
  return { summary, tiffs, files };
}

/** The georeference checks every artifact on the input's grid gets: GDAL reads both files, so they compare. */
function expectSameGrid(artifact: GdalInfo, input: GdalInfo) {
  expect(artifact.driverShortName).toBe("GTiff"); // GDAL as the reference reader: it opened the file as a GeoTIFF
  expect(artifact.bands).toHaveLength(1);
  expect(artifact.coordinateSystem.wkt).toBe(input.coordinateSystem.wkt); // GDAL: the same CRS, WKT2 as GDAL writes it
  expect(artifact.stac?.["proj:epsg"]).toBe(input.stac?.["proj:epsg"]); // GDAL: the same EPSG code
  expect(artifact.size).toEqual(input.size); // derived: one artifact cell per DEM cell
  expect(artifact.geoTransform).toEqual(input.geoTransform); // derived: the DEM's geotransform is copied, not recomputed
  expect(artifact.cornerCoordinates).toEqual(input.cornerCoordinates); // GDAL: hence the same extent
  expect(artifact.metadata[""]?.AREA_OR_POINT).toBe(input.metadata[""]?.AREA_OR_POINT); // GDAL: the same raster type
}

beforeAll(async () => {
  key = (await createKey(await signIn(ADMIN), ["datasets:write", "jobs:write", "jobs:read", "results:read"], "gdal artifacts suite")).secret;
  workDir = await mkdtemp(path.join(tmpdir(), "rillscale-gdal-"));
  for (const name of Object.keys(inputs) as InputName[]) {
    const f = fixture(inputs[name].fixture);
    datasetIds[name] = (await uploadOk(key, f.bytes, "image/tiff", `?filename=${path.basename(f.path)}`)).id;
    inputInfo[name] = await gdalinfo(f.path);
  }
});

afterAll(async () => {
  if (workDir) await rm(workDir, { recursive: true, force: true });
});

interface DrainageSummary {
  input: { validCells: number };
  basins: { count: number; list: { label: number; areaKm2: number }[] };
  horton: { highestOrder: number; table: { order: number }[] };
}

describe.each(Object.keys(inputs) as InputName[])("drainage GeoTIFFs of %s read by GDAL", (name) => {
  let out: Awaited<ReturnType<typeof runAndDownload>>;
  const info: Record<string, GdalInfo> = {};
  beforeAll(async () => {
    out = await runAndDownload(datasetIds[name], "drainage", inputs[name].params, name);
    for (const [artifact, file] of Object.entries(out.files)) info[artifact] = await gdalinfo(file, ["-stats", "-hist"]);
  });

  it("the job lists the three GeoTIFFs of the drainage pipeline, with the GeoTIFF media type (derived; OGC 19-008r4 media type)", () => {
    expect(out.tiffs.map((a) => a.name).sort()).toEqual(["basins.tif", "flow-accumulation.tif", "strahler-order.tif"]);
    for (const a of out.tiffs) expect(a.mediaType).toBe("image/tiff; application=geotiff");
  });

  it("each opens in GDAL with the input's CRS, geotransform, corners, size and raster type (GDAL as the reference reader)", () => {
    for (const artifact of Object.keys(out.files)) expectSameGrid(info[artifact], inputInfo[name]);
  });

  it("flow accumulation: NaN nodata declared, valid cells = the summary's, every cell drains at least itself, max = the largest basin's area (derived)", () => {
    const band = info["flow-accumulation.tif"].bands[0];
    expect(band.noDataValue).toBe("NaN"); // GDAL: nodata declared (NaN, as the pipeline writes for a float grid)
    const s = out.summary as unknown as DrainageSummary;
    expect(histogramOf(info["flow-accumulation.tif"]).total).toBe(s.input.validCells); // derived: nodata stays nodata, every valid cell has an area
    const stats = statsOf(info["flow-accumulation.tif"]);
    expect(stats.min).toBeGreaterThan(0); // derived: a cell's contributing area includes its own area
    // derived: in mode "all" the largest basin's outlet is the cell of largest contributing area (areas in m², summary in km²)
    const largestKm2 = Math.max(...s.basins.list.map((b) => b.areaKm2));
    expectClose(stats.max, largestKm2 * M2_PER_KM2, largestKm2 * M2_PER_KM2 * 1e-12);
  });

  it("Strahler order: nodata 0 declared, min 1, max = the summary's highest order, and every order 1…max present (derived)", () => {
    const band = info["strahler-order.tif"].bands[0];
    expect(band.type).toBe("Byte");
    expect(band.noDataValue).toBe(0); // GDAL: nodata declared (0 = not a channel)
    const s = out.summary as unknown as DrainageSummary;
    expect(statsOf(info["strahler-order.tif"]).min).toBe(1); // derived: channel cells start at order 1 (Strahler 1957)
    expect(statsOf(info["strahler-order.tif"]).max).toBe(s.horton.highestOrder); // derived: the summary's highest order
    // GDAL's Byte histogram has one bucket per value (-0.5…255.5, 256 buckets): orders painted = orders in the table
    const { h } = histogramOf(info["strahler-order.tif"]);
    expect([h.min, h.max, h.count]).toEqual([-0.5, 255.5, 256]);
    const painted = h.buckets.map((c, v) => (c > 0 ? v : -1)).filter((v) => v >= 0);
    expect(painted).toEqual(s.horton.table.map((r) => r.order));
  });

  it("basins: nodata 0 declared, labels 1…count, as many distinct labels as the summary's basin count (derived)", () => {
    const band = info["basins.tif"].bands[0];
    expect(band.noDataValue).toBe(0); // GDAL: nodata declared (0 = drains to no chosen outlet)
    const s = out.summary as unknown as DrainageSummary;
    expect(s.basins.count).toBeGreaterThan(1);
    expect(statsOf(info["basins.tif"]).min).toBe(1); // derived: labels are 1-based, in the order of the summary's list
    expect(statsOf(info["basins.tif"]).max).toBe(s.basins.count);
    // GDAL spreads 256 buckets over [min − ½, max + ½]: below 256 labels each integer falls in a bucket of its own
    expect(s.basins.count).toBeLessThan(256);
    const { total, filled } = histogramOf(info["basins.tif"]);
    expect(filled).toBe(s.basins.count);
    expect(total).toBeLessThanOrEqual(s.input.validCells); // derived: only valid cells belong to a basin
  });
});

describe("surface local-dimension GeoTIFF of elev.tif read by GDAL", () => {
  const params = { estimators: ["local-dimension"], localWindowCells: 16, localStepCells: 8 };
  let out: Awaited<ReturnType<typeof runAndDownload>>;
  let info: GdalInfo;
  beforeAll(async () => {
    out = await runAndDownload(datasetIds.elev, "surface", params, "surface");
    info = await gdalinfo(out.files["local-dimension.tif"], ["-stats", "-hist"]);
  });

  it("is the one GeoTIFF of the job and keeps the input's CRS and origin, with cells step × the input's (derived; GDAL as the reference reader)", () => {
    expect(out.tiffs.map((a) => a.name)).toEqual(["local-dimension.tif"]);
    const input = inputInfo.elev;
    const mapSize = (out.summary as { estimators: { localDimension: { mapSize: [number, number] } } }).estimators.localDimension.mapSize;
    expect(info.driverShortName).toBe("GTiff");
    expect(info.coordinateSystem.wkt).toBe(input.coordinateSystem.wkt); // GDAL: the same CRS
    expect(info.stac?.["proj:epsg"]).toBe(input.stac?.["proj:epsg"]);
    expect(info.size).toEqual(mapSize); // derived: one map cell per window position, as the summary says
    expect(info.size).toEqual(input.size.map((n) => Math.ceil(n / params.localStepCells))); // derived: windows every step cells from the origin
    const [x0, dx, rx, y0, ry, dy] = input.geoTransform;
    const step = params.localStepCells;
    // derived: same origin, step × the cell (to 1e-12 of a cell: the pipeline scales the size geotiff.js read)
    const expected = [x0, dx * step, rx, y0, ry, dy * step];
    expect(info.geoTransform).toHaveLength(6);
    info.geoTransform.forEach((v, i) => expectClose(v, expected[i], Math.abs(dx) * 1e-12));
    expect(info.cornerCoordinates.upperLeft).toEqual(input.cornerCoordinates.upperLeft); // GDAL: the same north-west corner
  });

  it("declares NaN nodata, and GDAL's min, max, mean and valid count equal the summary's (derived; float32 rounding)", () => {
    const band = info.bands[0];
    expect(band.type).toBe("Float32");
    expect(band.noDataValue).toBe("NaN");
    const s = (out.summary as { estimators: { localDimension: { summary: { estimated: number; windows: number; min: number; max: number; mean: number } } } })
      .estimators.localDimension.summary;
    expect(s.estimated).toBeGreaterThan(0);
    expect(s.estimated).toBeLessThan(s.windows); // derived: elev.tif's nodata leaves some windows without a value
    expect(histogramOf(info).total).toBe(s.estimated);
    const f32 = 2 ** -23; // float32's relative precision: the map is stored as float32, the summary in doubles
    const stats = statsOf(info);
    expectClose(stats.min, s.min, 4 * f32 * s.min);
    expectClose(stats.max, s.max, 4 * f32 * s.max);
    expectClose(stats.mean, s.mean, 1e-6 * s.mean);
    // a surface's dimension lies between 2 and 3 (Mandelbrot 1982); this fixture's windows all fall inside
    expect(stats.min).toBeGreaterThanOrEqual(2);
    expect(stats.max).toBeLessThanOrEqual(3);
  });
});
