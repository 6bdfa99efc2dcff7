// npm run bench -- surface [--dem file.tif | --synthetic 4096] — times each surface estimator and runs the native
// reference (../shared/reference/run.sh surface) on the same grid in the same run; prints one JSON object with
// seconds, peak RSS and the ratios ours/native for the semivariogram (four directions, dyadic lags, as the native)
// and for cube counting (true units, dyadic boxes, as the native).
import { execFileSync } from "node:child_process";
import { mkdtempSync, rmSync, writeFileSync } from "node:fs";
import os from "node:os";
import path from "node:path";
import { readDem, type Dem } from "@/lib/raster/read-geotiff";
import { projectedCellGeometry } from "@/lib/raster/cell-geometry";
import { makeGrid } from "@/lib/raster/grid";
import { variogram } from "@/lib/fractal/variogram";
import { cubeCounting } from "@/lib/fractal/cube-counting";
import { powerSpectrum } from "@/lib/fractal/power-spectrum";
import { triangularPrism } from "@/lib/fractal/triangular-prism";
import { localDimension } from "@/lib/fractal/local-dimension";
import { makeSurface, readRawFloat32, referenceDir, SURFACE } from "./drainage";

/** Targets of issue 4 on the 4096² surface. */
const TARGET_RATIO = 1.5;
const TARGET_BYTES_PER_CELL = 16;
const TARGET_BASE_MB = 300;
const MB = 1024 * 1024;
/** Local dimension map settings timed here: the pipeline's defaults. */
const LOCAL = { window: 64, step: 32 };
/** Runs of the two compared estimators, ours and the native's; the fastest of each is compared. */
const REPEATS = 3;
/** Side of the corner every estimator runs on once before it is timed. */
const WARM_UP_CELLS = 256;

interface NativeTimes { cells: number; variogram_s: number; cube_s: number; D_variogram: number[]; D_cube: number; lags: number; scales: number }

function argValue(argv: string[], name: string): string | undefined {
  const i = argv.indexOf(name);
  return i >= 0 ? argv[i + 1] : undefined;
}

function timed<T>(f: () => T): [T, number] {
  const t = process.hrtime.bigint();
  const r = f();
  return [r, Number(process.hrtime.bigint() - t) / 1e9];
}

/** The fastest of REPEATS runs: on a shared machine the minimum is the least disturbed measurement. */
function bestOf<T>(f: () => T): [T, number] {
  let best = timed(f);
  for (let i = 1; i < REPEATS; i++) { const r = timed(f); if (r[1] < best[1]) best = r; }
  return best;
}

const round = (v: number, digits = 3) => Math.round(v * 10 ** digits) / 10 ** digits;

export async function main(argv: string[]): Promise<number> {
  const demPath = argValue(argv, "--dem");
  const size = Number(argValue(argv, "--synthetic") ?? 4096);
  if (!demPath && !(Number.isInteger(size) && size >= 64)) throw new RangeError(`--synthetic needs a size ≥ 64, got ${size}`);
  const work = mkdtempSync(path.join(os.tmpdir(), "rillscale-bench-"));
  const notes: string[] = [];
  try {
    let source: string, rawForNative: string;
    if (demPath) {
      source = demPath;
      rawForNative = path.join(work, "dem.f32");
    } else {
      const surface = makeSurface(work, size);
      rawForNative = surface.raw;
      source = surface.tif ?? surface.raw;
      if (!surface.tif) notes.push("gdal_translate not found: decoded the raw .f32 instead of the GeoTIFF");
    }
    let dem: Dem | null = null;
    const t0 = process.hrtime.bigint();
    let elevation: Float32Array, w: number, h: number;
    if (source.endsWith(".f32")) {
      elevation = readRawFloat32(source, size * size);
      w = h = size;
    } else {
      dem = await readDem(source);
      ({ data: elevation, width: w, height: h } = dem.elevation);
    }
    const decodeS = Number(process.hrtime.bigint() - t0) / 1e9;
    const geometry = dem?.cellGeometry ?? projectedCellGeometry(h, SURFACE.cellM, SURFACE.cellM);
    const cellM = Math.sqrt(geometry.area[h >> 1]);
    if (demPath) writeFileSync(rawForNative, new Uint8Array(elevation.buffer, elevation.byteOffset, elevation.byteLength));
    const grid = makeGrid(elevation, w, h);
    const cells = w * h;

    // JIT warm-up on a 256² corner, so the timings are of optimised code as the native's are of compiled code
    const side = Math.min(WARM_UP_CELLS, w, h);
    const corner = new Float32Array(side * side);
    for (let y = 0; y < side; y++) corner.set(elevation.subarray(y * w, y * w + side), y * side);
    const warm = makeGrid(corner, side, side), warmGeometry = projectedCellGeometry(side, cellM, cellM);
    variogram(warm, warmGeometry, { lags: [1, 2, 4, 8, 16, 32] });
    cubeCounting(warm, warmGeometry);
    powerSpectrum(warm, warmGeometry);
    triangularPrism(warm, warmGeometry);
    localDimension(warm, warmGeometry, LOCAL);

    // the native's lags: 1, 2, 4, … while h ≤ W/8 and h ≤ H/8
    const lags: number[] = [];
    for (let lag = 1; lag <= w / 8 && lag <= h / 8; lag *= 2) lags.push(lag);
    const [v, variogramS] = bestOf(() => variogram(grid, geometry, { lags }));
    const [c, cubeS] = bestOf(() => cubeCounting(grid, geometry, { normalisation: "true-units" }));
    const [p, spectrumS] = timed(() => powerSpectrum(grid, geometry));
    const [t, prismS] = timed(() => triangularPrism(grid, geometry));
    const [l, localS] = timed(() => localDimension(grid, geometry, LOCAL));
    const peakRssBytes = process.resourceUsage().maxRSS * 1024;

    // native reference on the same grid, after ours so its memory is not in our peak RSS
    const nativeRuns = Array.from({ length: REPEATS }, () => {
      const out = execFileSync(path.join(referenceDir, "run.sh"), ["surface", rawForNative, String(w), String(h), String(cellM)], { encoding: "utf8" });
      return JSON.parse(out.trim().split("\n").pop() as string) as NativeTimes;
    });
    const native = {
      ...nativeRuns[0],
      variogram_s: Math.min(...nativeRuns.map((r) => r.variogram_s)),
      cube_s: Math.min(...nativeRuns.map((r) => r.cube_s)),
    };

    const rssTargetBytes = TARGET_BYTES_PER_CELL * cells + TARGET_BASE_MB * MB;
    const ratioVariogram = variogramS / native.variogram_s, ratioCube = cubeS / native.cube_s;
    console.log(JSON.stringify({
      benchmark: "surface",
      source: demPath ?? `fbm.py ${size} ${SURFACE.hurst} ${SURFACE.seed}, ${SURFACE.cellM} m cells`,
      decoded: source.endsWith(".f32") ? "raw float32" : "GeoTIFF via readDem",
      width: w, height: h, cells,
      seconds: {
        decode: round(decodeS), variogram: round(variogramS), cubeCounting: round(cubeS), powerSpectrum: round(spectrumS),
        triangularPrism: round(prismS), localDimension: round(localS),
      },
      work: {
        variogramLagsCells: lags, cubeSidesCells: c.sides, spectrumFft: [p.fftWidth, p.fftHeight], prismStepsCells: t.steps,
        localDimension: { ...LOCAL, windows: l.summary.windows },
      },
      dimensions: {
        variogramIsotropic: round(v.isotropic.dimension.value), variogramDirections: v.directions.map((d) => round(d.dimension.value)),
        cubeCounting: round(c.dimension.value), powerSpectrum: round(p.dimension.value), triangularPrism: round(t.dimension.value),
        localMean: round(l.summary.mean),
      },
      peakRssMB: round(peakRssBytes / MB, 1),
      peakRssBytesPerCell: round(peakRssBytes / cells, 2),
      native: { variogram: native.variogram_s, cubeCounting: native.cube_s, runs: nativeRuns.map((r) => [r.variogram_s, r.cube_s]), D_variogram: native.D_variogram, D_cube: native.D_cube },
      ratios: { variogram: round(ratioVariogram, 2), cubeCounting: round(ratioCube, 2) },
      targets: {
        ratioMax: TARGET_RATIO,
        variogramMet: ratioVariogram <= TARGET_RATIO,
        cubeCountingMet: ratioCube <= TARGET_RATIO,
        rssLimitMB: round(rssTargetBytes / MB, 1),
        rssMet: peakRssBytes <= rssTargetBytes,
      },
      notes: [...notes, `every estimator ran once on a ${side}² corner before it was timed (JIT warm-up)`,
        `variogram and cube counting: fastest of ${REPEATS} runs, ours and the native's alike; other estimators: one run`],
    }, null, 2));
    return 0;
  } finally {
    rmSync(work, { recursive: true, force: true });
  }
}
