// Semivariogram dimension of a surface: Mark & Aronson (1984), Math. Geol. 16(7):671–683 —
// γ(h) = ½E[(z(x+h) − z(x))²] ∝ h^(2H), D = 3 − H, in four directions with true lag distances.
import type { Grid } from "@/lib/raster/grid";
import type { CellGeometry } from "@/lib/raster/cell-geometry";
import { deriveFromSlope, fitLogLog, type Derived, type LogLogFit, type ScalingRange } from "./loglog-fit";

/** Directions as (column step, row step); rows go south, so (1, 1) runs NW→SE. */
export const VARIOGRAM_DIRECTIONS = [
  { name: "E-W", dx: 1, dy: 0 },
  { name: "N-S", dx: 0, dy: 1 },
  { name: "NW-SE", dx: 1, dy: 1 },
  { name: "SW-NE", dx: 1, dy: -1 },
] as const;
export type VariogramDirection = (typeof VARIOGRAM_DIRECTIONS)[number]["name"];

/** Default number of log-spaced lags (before duplicates of small integers are merged). */
export const DEFAULT_LAG_COUNT = 16;
/** Default largest lag as a fraction of the shorter grid side: beyond ~¼ the pairs thin out and a finite
 *  (or periodic) surface flattens γ (common practice). */
export const DEFAULT_MAX_LAG_FRACTION = 0.25;

export interface VariogramOptions {
  /** lag steps in cells (positive integers); overrides lagCount/maxLagFraction */
  lags?: number[];
  lagCount?: number;
  maxLagFraction?: number;
  /** user scaling range in metres (lag distance) */
  range?: ScalingRange;
}

export interface VariogramSeries {
  /** lag in cells along the direction (for the isotropic series: the lag index shared by all four) */
  lags: number[];
  /** mean pair distance of each lag, m */
  distance: number[];
  /** semivariance, z-units² */
  semivariance: number[];
  /** pairs per lag (isotropic series: summed over the four directions) */
  pairs: number[];
  fit: LogLogFit;
  hurst: Derived;
  dimension: Derived;
}

export interface VariogramResult {
  method: string;
  units: { distance: "m"; semivariance: string; dimension: "dimensionless" };
  isotropic: VariogramSeries;
  directions: (VariogramSeries & { direction: VariogramDirection })[];
  anisotropy: {
    /** largest over smallest directional D */
    dimensionRatio: number;
    /** √(γ_roughest / γ_smoothest) from the directional fits at `referenceDistance` (≥ 1) */
    roughnessRatio: number;
    referenceDistance: number;
    roughest: VariogramDirection;
    smoothest: VariogramDirection;
  };
}

/** Integer lags log-spaced between 1 and maxLag, duplicates merged. */
export function logSpacedLags(maxLag: number, count: number): number[] {
  if (!(maxLag >= 1)) throw new RangeError(`largest lag must be ≥ 1 cell, got ${maxLag}`);
  const out = new Set<number>();
  for (let i = 0; i < count; i++) out.add(Math.round(Math.exp((Math.log(maxLag) * i) / Math.max(1, count - 1))));
  return [...out].sort((a, b) => a - b);
}

/** Distance between row centres from the top row, m (cumulative cell heights). */
function rowNorthing(geometry: CellGeometry, height: number): Float64Array {
  const n = new Float64Array(height);
  for (let r = 1; r < height; r++) n[r] = n[r - 1] + 0.5 * (geometry.dy[r - 1] + geometry.dy[r]);
  return n;
}

function rowsWithNodata(grid: Grid<Float32Array>): Uint8Array {
  const { data, width, height } = grid;
  const flag = new Uint8Array(height);
  for (let y = 0; y < height; y++) {
    const o = y * width;
    for (let x = 0; x < width; x++) if (data[o + x] !== data[o + x]) { flag[y] = 1; break; }
  }
  return flag;
}

interface Accumulated { sum: number; pairs: number; distanceSum: number }

/** Squared differences at lag h in the four directions (the order of VARIOGRAM_DIRECTIONS) in one pass over
 *  each pair of rows y and y + h: the four loads a[x], a[x+h], b[x], b[x+h] serve all four directions, so the
 *  grid is streamed once per lag instead of once per direction. The NaN test runs only on rows holding nodata. */
function accumulateLag(grid: Grid<Float32Array>, geometry: CellGeometry, northing: Float64Array, nodataRows: Uint8Array,
  h: number): Accumulated[] {
  const { data, width, height } = grid;
  const n = width - h;
  let ewS = 0, ewP = 0, ewD = 0, nsS = 0, nsP = 0, nsD = 0, seS = 0, seP = 0, seD = 0, neS = 0, neP = 0, neD = 0;
  for (let y = 0; y < height; y++) {
    const paired = y + h < height;
    // row views: V8 keeps a fresh view's base and length in registers, ~2.5× faster than offsets into data
    const A = data.subarray(y * width, (y + 1) * width), B = paired ? data.subarray((y + h) * width, (y + h + 1) * width) : A;
    let s0 = 0, s1 = 0, s2 = 0, s3 = 0, c0 = n, c1 = paired ? width : 0, c2 = paired ? n : 0, c3 = c2;
    if (nodataRows[y] === 0 && (!paired || nodataRows[y + h] === 0)) {
      if (paired) {
        for (let x = 0; x < n; x++) {
          const a0 = A[x], a1 = A[x + h], b0 = B[x], b1 = B[x + h];
          const e0 = a1 - a0, e1 = b0 - a0, e2 = b1 - a0, e3 = a1 - b0;
          s0 += e0 * e0; s1 += e1 * e1; s2 += e2 * e2; s3 += e3 * e3;
        }
        for (let x = n; x < width; x++) { const e = B[x] - A[x]; s1 += e * e; }
      } else {
        for (let x = 0; x < n; x++) { const e = A[x + h] - A[x]; s0 += e * e; }
      }
    } else {
      c0 = 0; c1 = 0; c2 = 0; c3 = 0;
      for (let x = 0; x < n; x++) {
        const a0 = A[x], a1 = A[x + h];
        const e0 = a1 - a0;
        if (e0 === e0) { s0 += e0 * e0; c0++; }
        if (!paired) continue;
        const b0 = B[x], b1 = B[x + h];
        const e1 = b0 - a0, e2 = b1 - a0, e3 = a1 - b0;
        if (e1 === e1) { s1 += e1 * e1; c1++; }
        if (e2 === e2) { s2 += e2 * e2; c2++; }
        if (e3 === e3) { s3 += e3 * e3; c3++; }
      }
      if (paired) for (let x = n; x < width; x++) { const e = B[x] - A[x]; if (e === e) { s1 += e * e; c1++; } }
    }
    ewS += s0; ewP += c0; ewD += c0 * h * geometry.dx[y];
    if (!paired) continue;
    const ns = northing[y + h] - northing[y], ew = h * 0.5 * (geometry.dx[y] + geometry.dx[y + h]);
    const diagonal = Math.sqrt(ew * ew + ns * ns);
    nsS += s1; nsP += c1; nsD += c1 * ns;
    seS += s2; seP += c2; seD += c2 * diagonal;
    neS += s3; neP += c3; neD += c3 * diagonal;
  }
  return [
    { sum: ewS, pairs: ewP, distanceSum: ewD }, { sum: nsS, pairs: nsP, distanceSum: nsD },
    { sum: seS, pairs: seP, distanceSum: seD }, { sum: neS, pairs: neP, distanceSum: neD },
  ];
}

interface LagStats { distance: number; semivariance: number; pairs: number }

function directional(acc: Accumulated): LagStats {
  return { distance: acc.distanceSum / acc.pairs, semivariance: (0.5 * acc.sum) / acc.pairs, pairs: acc.pairs };
}

function series(lags: number[], stats: (LagStats | null)[], range: VariogramOptions["range"]): VariogramSeries {
  const keep = stats.map((st, i) => (st ? i : -1)).filter((i) => i >= 0);
  const distance = keep.map((i) => stats[i]!.distance);
  const semivariance = keep.map((i) => stats[i]!.semivariance);
  const fit = fitLogLog(distance, semivariance, { unit: "m", range });
  return {
    lags: keep.map((i) => lags[i]), distance, semivariance, pairs: keep.map((i) => stats[i]!.pairs),
    fit, hurst: deriveFromSlope(fit, 0, 0.5), dimension: deriveFromSlope(fit, 3, -0.5),
  };
}

interface LagTables { lags: number[]; stats: (LagStats | null)[][]; pooled: (LagStats | null)[] }

/** Semivariances of every direction and lag, and their isotropic mean; inputs checked here once. */
function lagTables(grid: Grid<Float32Array>, geometry: CellGeometry, options: VariogramOptions): LagTables {
  const { width, height } = grid;
  if (geometry.dx.length !== height) throw new RangeError(`cell geometry has ${geometry.dx.length} rows, grid has ${height}`);
  const lags = options.lags ?? logSpacedLags(
    Math.max(1, Math.floor(Math.min(width, height) * (options.maxLagFraction ?? DEFAULT_MAX_LAG_FRACTION))),
    options.lagCount ?? DEFAULT_LAG_COUNT);
  for (const h of lags) {
    if (!Number.isInteger(h) || h < 1 || h >= Math.min(width, height)) {
      throw new RangeError(`lags must be integers in [1, ${Math.min(width, height) - 1}] cells, got ${h}`);
    }
  }
  if (lags.length < 2) throw new RangeError(`at least 2 lags are needed, got ${lags.length}`);
  const northing = rowNorthing(geometry, height);
  const nodataRows = rowsWithNodata(grid);
  const perLag = lags.map((h) => accumulateLag(grid, geometry, northing, nodataRows, h));
  const stats = VARIOGRAM_DIRECTIONS.map((_, k) => perLag.map((lag) => (lag[k].pairs > 0 ? directional(lag[k]) : null)));
  // Isotropic: the plain mean over the four directions of γ and of distance at each lag step. Under a power
  // law each direction is c_d·h^2H at k_d·h, so the means keep the exponent exactly (diagonals are √2 longer).
  const pooled = lags.map((_, i): LagStats | null => {
    if (stats.some((dir) => dir[i] === null)) return null;
    let semivariance = 0, distance = 0, pairs = 0;
    for (const dir of stats) { semivariance += dir[i]!.semivariance / 4; distance += dir[i]!.distance / 4; pairs += dir[i]!.pairs; }
    return { distance, semivariance, pairs };
  });
  return { lags, stats, pooled };
}

/** The isotropic series alone: one fit instead of five (for many small windows, as the local dimension map). */
export function isotropicVariogram(grid: Grid<Float32Array>, geometry: CellGeometry, options: VariogramOptions = {}): VariogramSeries {
  const { lags, pooled } = lagTables(grid, geometry, options);
  return series(lags, pooled, options.range);
}

export function variogram(grid: Grid<Float32Array>, geometry: CellGeometry, options: VariogramOptions = {}): VariogramResult {
  const { lags, stats, pooled } = lagTables(grid, geometry, options);
  const isotropic = series(lags, pooled, options.range);
  const directions = VARIOGRAM_DIRECTIONS.map((d, k) => ({ direction: d.name, ...series(lags, stats[k], options.range) }));
  const ds = directions.map((d) => d.dimension.value);
  const referenceDistance = Math.sqrt(isotropic.fit.range.min * isotropic.fit.range.max);
  const lr = Math.log(referenceDistance);
  const logGamma = directions.map((d) => d.fit.intercept + d.fit.slope * lr);
  const rough = logGamma.indexOf(Math.max(...logGamma)), smooth = logGamma.indexOf(Math.min(...logGamma));
  return {
    method: "semivariogram, Mark & Aronson (1984)",
    units: { distance: "m", semivariance: "z-units²", dimension: "dimensionless" },
    isotropic, directions,
    anisotropy: {
      dimensionRatio: Math.max(...ds) / Math.min(...ds),
      roughnessRatio: Math.exp(0.5 * (logGamma[rough] - logGamma[smooth])),
      referenceDistance,
      roughest: directions[rough].direction,
      smoothest: directions[smooth].direction,
    },
  };
}
