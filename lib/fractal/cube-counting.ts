// Differential box counting: Sarkar & Chaudhuri (1994), IEEE Trans. Syst. Man Cybern. 24(1):115–120 — each
// s×s block counts n = l − k + 1 boxes between the box indices of its min and max; N(s) ∝ s^−D.
import type { Grid } from "@/lib/raster/grid";
import type { CellGeometry } from "@/lib/raster/cell-geometry";
import { deriveFromSlope, fitLogLog, type Derived, type LogLogFit, type ScalingRange } from "./loglog-fit";

/** How the box height relates to the box side; D depends on it (Panigrahy et al. 2017, Entropy 19(10):534).
 *  "true-units": box height = box side in metres (z in metres).
 *  "grid-extent": box height = s · (z range / cells across the shorter side), Sarkar & Chaudhuri's h′ = s·G/M. */
export type VerticalNormalisation = "true-units" | "grid-extent";

/** Fewest blocks along the shorter side at the coarsest level: fewer and the count is dominated by edge blocks. */
export const MIN_BLOCKS_PER_SIDE = 4;

export interface CubeCountingOptions {
  normalisation?: VerticalNormalisation;
  /** user scaling range in metres (box side) */
  range?: ScalingRange;
}

export interface CubeCountingResult {
  method: string;
  normalisation: VerticalNormalisation;
  /** box height per cell of box side, z-units (constant for "grid-extent"; the cell size for "true-units") */
  boxHeightPerCell: number;
  units: { boxSide: "m"; count: "boxes"; dimension: "dimensionless" };
  /** box sides in cells (powers of two) */
  sides: number[];
  /** box sides, m (the side in cells × the mean cell size √(dx·dy)) */
  scales: number[];
  counts: number[];
  fit: LogLogFit;
  dimension: Derived;
}

/** Boxes are stacked from the lowest valid elevation (Sarkar & Chaudhuri stack them from grey level 0), so
 *  adding a constant to z changes no count; a datum inside the relief would split every block it crosses.
 *  Counts boxes over a min/max pyramid: each level halves the previous one (2×2 blocks), so every level costs
 *  a quarter of the last. Blocks beyond the last whole block of a row or column are dropped. */
export function cubeCounting(grid: Grid<Float32Array>, geometry: CellGeometry, options: CubeCountingOptions = {}): CubeCountingResult {
  const { data, width, height } = grid;
  if (geometry.dx.length !== height) throw new RangeError(`cell geometry has ${geometry.dx.length} rows, grid has ${height}`);
  if (Math.min(width, height) < 2 * MIN_BLOCKS_PER_SIDE) {
    throw new RangeError(`cube counting needs at least ${2 * MIN_BLOCKS_PER_SIDE} cells a side, got ${width}×${height}`);
  }
  const normalisation = options.normalisation ?? "true-units";
  // per-row horizontal cell size (geometric mean of dx and dy), m
  const cell = Float64Array.from(geometry.dx, (dx, r) => Math.sqrt(dx * geometry.dy[r]));
  let meanCell = 0;
  for (let r = 0; r < height; r++) meanCell += cell[r] / height;
  let zmin = Infinity, zmax = -Infinity;
  for (let i = 0; i < data.length; i++) { const v = data[i]; if (v < zmin) zmin = v; if (v > zmax) zmax = v; }
  if (!(zmin <= zmax)) throw new RangeError("the grid holds no valid cell");
  const extentHeight = (zmax - zmin) / Math.min(width, height) || 1; // a constant surface: any height counts 1 box
  const boxHeightPerCell = normalisation === "true-units" ? meanCell : extentHeight;

  let w = width >> 1, h = height >> 1;
  let mn = new Float32Array(w * h), mx = new Float32Array(w * h);
  for (let y = 0; y < h; y++) {
    const r0 = 2 * y * width, r1 = r0 + width, o = y * w;
    for (let x = 0; x < w; x++) {
      const a = data[r0 + 2 * x], b = data[r0 + 2 * x + 1], c = data[r1 + 2 * x], d = data[r1 + 2 * x + 1];
      // comparisons with NaN are false, so nodata cells drop out; an all-nodata block stays (+∞, −∞)
      let lo = Infinity, hi = -Infinity;
      if (a < lo) lo = a; if (a > hi) hi = a; if (b < lo) lo = b; if (b > hi) hi = b;
      if (c < lo) lo = c; if (c > hi) hi = c; if (d < lo) lo = d; if (d > hi) hi = d;
      mn[o + x] = lo; mx[o + x] = hi;
    }
  }
  const sides: number[] = [], scales: number[] = [], counts: number[] = [];
  for (let s = 2; ; s *= 2) {
    let count = 0;
    for (let y = 0; y < h; y++) {
      const unit = normalisation === "true-units" ? cell[y * s] : extentHeight;
      const inv = 1 / (s * unit), o = y * w;
      for (let x = 0; x < w; x++) {
        const lo = mn[o + x], hi = mx[o + x];
        if (lo <= hi) count += Math.floor((hi - zmin) * inv) - Math.floor((lo - zmin) * inv) + 1;
      }
    }
    sides.push(s); scales.push(s * meanCell); counts.push(count);
    if (Math.min(w, h) < 2 * MIN_BLOCKS_PER_SIDE) break;
    const w2 = w >> 1, h2 = h >> 1;
    const nmn = mn.subarray(0, w2 * h2), nmx = mx.subarray(0, w2 * h2); // in place: each write is behind its reads
    for (let y = 0; y < h2; y++) {
      const r0 = 2 * y * w, r1 = r0 + w, o = y * w2;
      for (let x = 0; x < w2; x++) {
        const i = r0 + 2 * x, j = r1 + 2 * x;
        let lo = mn[i], hi = mx[i];
        if (mn[i + 1] < lo) lo = mn[i + 1]; if (mn[j] < lo) lo = mn[j]; if (mn[j + 1] < lo) lo = mn[j + 1];
        if (mx[i + 1] > hi) hi = mx[i + 1]; if (mx[j] > hi) hi = mx[j]; if (mx[j + 1] > hi) hi = mx[j + 1];
        nmn[o + x] = lo; nmx[o + x] = hi;
      }
    }
    mn = nmn; mx = nmx; w = w2; h = h2;
  }
  const fit = fitLogLog(scales, counts, { unit: "m", range: options.range });
  return {
    method: "differential box counting, Sarkar & Chaudhuri (1994)",
    normalisation, boxHeightPerCell,
    units: { boxSide: "m", count: "boxes", dimension: "dimensionless" },
    sides, scales, counts, fit, dimension: deriveFromSlope(fit, 0, -1),
  };
}
