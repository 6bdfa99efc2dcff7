// npm run bench -- drainage [--dem file.tif | --synthetic 4096] [--threshold-km2 1] — times the drainage
// core stage by stage and runs the native reference (../shared/reference/run.sh drainage) on the same
// grid in the same run; prints one JSON object with seconds, ratios ours/native and peak RSS.
import { execFileSync, spawnSync } from "node:child_process";
import { closeSync, existsSync, mkdtempSync, openSync, readSync, rmSync, writeFileSync } from "node:fs";
import os from "node:os";
import path from "node:path";
import { readDem, type Dem } from "@/lib/raster/read-geotiff";
import { projectedCellGeometry } from "@/lib/raster/cell-geometry";
import { conditionAndRoute, type ConditionStage } from "@/lib/hydro/condition";
import { flowAccumulation } from "@/lib/hydro/flow-accumulation";
import { channelMask, km2ToM2 } from "@/lib/hydro/channels";
import { networkFromRaster } from "@/lib/network/from-raster";
import { strahlerOrder } from "@/lib/network/strahler";

const repoRoot = path.resolve(import.meta.dirname, "../..");
export const referenceDir = path.resolve(repoRoot, "../shared/reference");
/** The benchmark surface of the issues: fbm.py SIZE 0.7 7 with a 30 m cell (reference README). */
export const SURFACE = { hurst: 0.7, seed: 7, cellM: 30 };
/** UTM zone 33N: any projected metre CRS would do; the README asks for a UTM one. */
const SURFACE_EPSG = 32633;
/** Targets of issue 3 on the 4096² surface. */
const TARGET_RATIO = 1.5;
const TARGET_BYTES_PER_CELL = 32;
const TARGET_BASE_MB = 300;
const MB = 1024 * 1024;

interface NativeTimes {
  cells: number;
  fill_s: number;
  d8_s: number;
  accum_s: number;
  strahler_s: number;
  total_s: number;
  stream_cells: number;
  max_order: number;
}

function argValue(argv: string[], name: string): string | undefined {
  const i = argv.indexOf(name);
  return i >= 0 ? argv[i + 1] : undefined;
}

/** python3 with numpy: the one on PATH (pyenv here) or Debian's, where python3-numpy installs it. */
function pythonWithNumpy(): string {
  for (const candidate of ["python3", "/usr/bin/python3"]) {
    const probe = spawnSync(candidate, ["-c", "import numpy"], { stdio: "ignore" });
    if (probe.status === 0) return candidate;
  }
  throw new Error("no python3 with numpy found; on Debian: apt-get install -y python3-numpy");
}

/** Raw little-endian Float32 file straight into one Float32Array (no intermediate buffer). */
export function readRawFloat32(file: string, cells: number): Float32Array {
  const data = new Float32Array(cells);
  const bytes = new Uint8Array(data.buffer);
  const fd = openSync(file, "r");
  try {
    for (let off = 0; off < bytes.length; ) {
      const got = readSync(fd, bytes, off, Math.min(1 << 26, bytes.length - off), off);
      if (got === 0) throw new Error(`${file} ends after ${off} bytes, expected ${bytes.length}`);
      off += got;
    }
  } finally {
    closeSync(fd);
  }
  return data;
}

/** The synthetic surface as the README describes it: raw .f32 from fbm.py, then a GeoTIFF (Float32,
 *  Deflate, floating-point predictor, 256×256 tiles, UTM, nodata −9999) by gdal_translate via an ENVI
 *  header. Returns the GeoTIFF path, or null when gdal_translate is missing. */
export function makeSurface(dir: string, size: number): { raw: string; tif: string | null } {
  const raw = path.join(dir, "surface.f32");
  execFileSync(pythonWithNumpy(), [path.join(referenceDir, "fbm.py"), String(size), String(SURFACE.hurst), String(SURFACE.seed), raw]);
  writeFileSync(
    path.join(dir, "surface.hdr"),
    `ENVI\nsamples = ${size}\nlines = ${size}\nbands = 1\nheader offset = 0\nfile type = ENVI Standard\n` +
      `data type = 4\ninterleave = bsq\nbyte order = 0\n`,
  );
  const tif = path.join(dir, "surface.tif");
  const extent = size * SURFACE.cellM;
  const args = [
    "-q", "-of", "GTiff", "-ot", "Float32", "-a_srs", `EPSG:${SURFACE_EPSG}`, "-a_nodata", "-9999",
    "-a_ullr", "500000", String(4_000_000 + extent), String(500_000 + extent), "4000000",
    "-co", "COMPRESS=DEFLATE", "-co", "PREDICTOR=3", "-co", "TILED=YES", "-co", "BLOCKXSIZE=256", "-co", "BLOCKYSIZE=256",
    raw, tif,
  ];
  const run = spawnSync("gdal_translate", args, { stdio: ["ignore", "ignore", "pipe"] });
  if (run.error || run.status !== 0) return { raw, tif: null };
  return { raw, tif };
}

/** Runs the native reference; under /usr/bin/time when present, for its CPU seconds (user + system),
 *  which a busy machine inflates far less than the wall-clock seconds it prints. */
function runNative(args: string[], work: string): NativeTimes & { cpuS: number | null } {
  const script = path.join(referenceDir, "run.sh");
  // run.sh compiles on first use; do that on a tiny grid first so the compiler's CPU is not counted
  const tiny = path.join(work, "tiny.f32");
  writeFileSync(tiny, new Uint8Array(16 * 16 * 4));
  spawnSync(script, ["drainage", tiny, "16", "16", "30", "1"], { stdio: "ignore" });
  const timed = existsSync("/usr/bin/time");
  const run = timed
    ? spawnSync("/usr/bin/time", ["-f", "rillscale-cpu %U %S", script, ...args], { encoding: "utf8" })
    : spawnSync(script, args, { encoding: "utf8" });
  if (run.status !== 0) throw new Error(`native reference failed: ${run.stderr}`);
  const times = JSON.parse(run.stdout.trim().split("\n").pop() as string) as NativeTimes;
  const cpuLine = /rillscale-cpu ([\d.]+) ([\d.]+)/.exec(run.stderr ?? "");
  return { ...times, cpuS: cpuLine ? Number(cpuLine[1]) + Number(cpuLine[2]) : null };
}

function seconds(start: bigint): number {
  return Number(process.hrtime.bigint() - start) / 1e9;
}

const round = (v: number, digits = 3) => Math.round(v * 10 ** digits) / 10 ** digits;

export async function main(argv: string[]): Promise<number> {
  const demPath = argValue(argv, "--dem");
  const size = Number(argValue(argv, "--synthetic") ?? 4096);
  const thresholdKm2 = Number(argValue(argv, "--threshold-km2") ?? 1);
  if (!demPath && !(Number.isInteger(size) && size >= 16)) throw new RangeError(`--synthetic needs a size ≥ 16, got ${size}`);
  const thresholdM2 = km2ToM2(thresholdKm2);
  const work = mkdtempSync(path.join(os.tmpdir(), "rillscale-bench-"));
  const notes: string[] = [];
  try {
    // Decode: the GeoTIFF through readDem; the raw file only when no GeoTIFF could be made.
    let source: string, rawForNative: string;
    let dem: Dem | null = null;
    let decodeS: number;
    let elevation: Float32Array, w: number, h: number;
    if (demPath) {
      source = demPath;
      rawForNative = path.join(work, "dem.f32");
    } else {
      const surface = makeSurface(work, size);
      rawForNative = surface.raw;
      source = surface.tif ?? surface.raw;
      if (!surface.tif) notes.push("gdal_translate not found: decoded the raw .f32 instead of the GeoTIFF");
    }
    const t0 = process.hrtime.bigint();
    if (source.endsWith(".f32")) {
      elevation = readRawFloat32(source, size * size);
      w = h = size;
    } else {
      dem = await readDem(source);
      ({ data: elevation, width: w, height: h } = dem.elevation);
    }
    decodeS = seconds(t0);
    const geometry = dem?.cellGeometry ?? projectedCellGeometry(h, SURFACE.cellM, SURFACE.cellM);
    const cellM = Math.sqrt(geometry.area[h >> 1]);
    if (demPath) writeFileSync(rawForNative, new Uint8Array(elevation.buffer, elevation.byteOffset, elevation.byteLength));
    const grid = { data: elevation, width: w, height: h };
    const cells = w * h;

    const cpu0 = process.cpuUsage();
    // one call, as in the pipeline: fill, flats and D8 on two threads (lib/hydro/condition.ts); a stage's
    // seconds run from its start to the next one's
    const t1 = process.hrtime.bigint();
    const starts: Partial<Record<ConditionStage, bigint>> = {};
    const routed = await conditionAndRoute(grid, geometry, { onStage: (stage) => { starts[stage] = process.hrtime.bigint(); } });
    const t4 = process.hrtime.bigint();
    const fillS = Number((starts.flats as bigint) - t1) / 1e9;
    const flatsS = Number((starts.directions as bigint) - (starts.flats as bigint)) / 1e9;
    const directionsS = Number(t4 - (starts.directions as bigint)) / 1e9;
    const { fill, directions, flats: flatSummary } = routed;
    const filled = routed.dem;
    if (dem) dem.elevation = filled; // as in the pipeline: the unfilled elevations may go
    const acc = flowAccumulation(directions, filled, geometry, { donors: routed.donors, reuse: routed.spare ?? undefined });
    const accumulationS = seconds(t4);
    const channelCells = channelMask(acc.areaM2, thresholdM2).reduce((s, v) => s + v, 0);
    const t5 = process.hrtime.bigint();
    const transform = dem?.georef.transform ?? { originX: 0, originY: h * cellM, pixelSizeX: cellM, pixelSizeY: cellM };
    const raster = networkFromRaster({
      directions, areaM2: acc.areaM2, thresholdM2, elevation: filled.data, cellGeometry: geometry, transform,
      crs: dem?.georef.crs.proj4 ?? `EPSG:${SURFACE_EPSG}`,
    });
    const linkOrder = strahlerOrder(raster.network);
    const orderingS = seconds(t5);
    const cpu = process.cpuUsage(cpu0);
    const comparableCpuS = (cpu.user + cpu.system) / 1e6;
    const maxOrder = linkOrder.reduce((m, v) => Math.max(m, v), 0);
    const peakRssBytes = process.resourceUsage().maxRSS * 1024;

    // Native reference on the same grid (after ours, so its memory is not in our peak RSS).
    const thresholdCells = Math.ceil(thresholdM2 / geometry.area[h >> 1]);
    const native = runNative(["drainage", rawForNative, String(w), String(h), String(cellM), String(thresholdCells)], work);
    const conditioningS = fillS + flatsS;
    const comparableS = conditioningS + directionsS + accumulationS + orderingS;
    const rssTargetBytes = TARGET_BYTES_PER_CELL * cells + TARGET_BASE_MB * MB;
    const ratioTotal = comparableS / native.total_s;
    const report = {
      benchmark: "drainage",
      source: demPath ?? `fbm.py ${size} ${SURFACE.hurst} ${SURFACE.seed}, ${SURFACE.cellM} m cells`,
      decoded: source.endsWith(".f32") ? "raw float32" : "GeoTIFF via readDem",
      width: w,
      height: h,
      cells,
      thresholdKm2,
      seconds: {
        decode: round(decodeS),
        conditioning: round(conditioningS),
        conditioningFill: round(fillS),
        conditioningFlats: round(flatsS),
        directions: round(directionsS),
        accumulation: round(accumulationS),
        ordering: round(orderingS),
        comparableTotal: round(comparableS),
      },
      cellsPerSecond: Math.round(cells / comparableS),
      cpuSeconds: {
        comparableTotal: round(comparableCpuS),
        nativeProcess: native.cpuS,
        ratioOursToNative: native.cpuS ? round(comparableCpuS / native.cpuS, 2) : null,
      },
      peakRssMB: round(peakRssBytes / MB, 1),
      peakRssBytesPerCell: round(peakRssBytes / cells, 2),
      native: {
        fill: native.fill_s, directions: native.d8_s, accumulation: native.accum_s, ordering: native.strahler_s, total: native.total_s,
      },
      ratioOursToNative: {
        conditioning: round(conditioningS / native.fill_s, 2),
        directions: round(directionsS / native.d8_s, 2),
        accumulation: round(accumulationS / native.accum_s, 2),
        ordering: round(orderingS / native.strahler_s, 2),
        comparableTotal: round(ratioTotal, 2),
      },
      targets: {
        comparableRatioAtMost: TARGET_RATIO,
        comparableRatioMet: ratioTotal <= TARGET_RATIO,
        peakRssAtMostMB: round(rssTargetBytes / MB, 1),
        peakRssMet: peakRssBytes <= rssTargetBytes,
      },
      evidence: {
        fill,
        flats: flatSummary,
        outlets: acc.outlets,
        channelCells,
        nativeStreamCells: native.stream_cells,
        links: raster.network.links.length,
        maxStrahlerOrder: maxOrder,
        nativeMaxOrder: native.max_order,
      },
      notes: [
        ...notes,
        "conditioning = Priority-Flood (plain queue, slope tracing; it marks the cells the flat resolution tests) + flat resolution; the native fill is Priority-Flood+epsilon, which needs no flat step",
        "two threads (lib/hydro/condition.ts): during the fill a helper thread starts and maps the pages of the later stages' arrays; then, while this one finds the flats, it sets the D8 directions from elevations alone; then the two flat searches run at once, and last both route the flat cells, half the rows each. conditioningFlats spans the D8 directions and the searches; directions is only the routing of the flat cells, so its ratio to the native D8 understates D8's work. Single-threaded stages otherwise; cpuSeconds counts both threads",
        "ordering = links from the D8 grid (lib/network/from-raster) + Strahler order of links; the native orders cells",
        "cpuSeconds: user + system CPU of our comparable stages against the whole native process (its file read included); wall-clock ratios are the target's measure but swing with the machine's load",
      ],
    };
    console.log(JSON.stringify(report, null, 2));
    return 0;
  } finally {
    if (existsSync(work)) rmSync(work, { recursive: true, force: true });
  }
}
