// Local surface dimension: the semivariogram D of Mark & Aronson (1984), Math. Geol. 16(7):671–683, in moving
// windows, giving a map of roughness; every window is fitted over the same lags so the values compare.
import { makeGrid, type Grid } from "@/lib/raster/grid";
import type { CellGeometry } from "@/lib/raster/cell-geometry";
import { isotropicVariogram, logSpacedLags } from "./variogram";

/** Default share of valid cells a window needs; below it the map holds nodata (NaN). */
export const DEFAULT_MIN_VALID_FRACTION = 0.5;
/** Default number of lags per window, log-spaced from 1 to a quarter of the window. */
export const DEFAULT_WINDOW_LAGS = 6;

export interface LocalDimensionOptions {
  /** window side in cells (≥ 8) */
  window: number;
  /** distance between window centres in cells (≥ 1); also the output cell size in input cells */
  step: number;
  /** lags in cells; default DEFAULT_WINDOW_LAGS log-spaced from 1 to window/4 */
  lags?: number[];
  minValidFraction?: number;
}

export interface LocalDimensionResult {
  method: string;
  /** D per output cell; output cell (i, j) covers input cells [i·step, (i+1)·step) × [j·step, (j+1)·step)
   *  and holds the D of the window centred on that block (shifted inwards at the edges) */
  dimension: Grid<Float32Array>;
  /** R² of each window's fit */
  rSquared: Grid<Float32Array>;
  window: number;
  step: number;
  lags: number[];
  units: { window: "cells"; dimension: "dimensionless" };
  summary: { windows: number; estimated: number; min: number; max: number; mean: number };
}

export function localDimension(grid: Grid<Float32Array>, geometry: CellGeometry, options: LocalDimensionOptions,
  onProgress?: (fraction: number) => void): LocalDimensionResult {
  const { data, width, height } = grid;
  const { window: win, step } = options;
  const minValid = options.minValidFraction ?? DEFAULT_MIN_VALID_FRACTION;
  if (!Number.isInteger(win) || win < 8) throw new RangeError(`window must be an integer ≥ 8 cells, got ${win}`);
  if (win > Math.min(width, height)) throw new RangeError(`window of ${win} cells exceeds the grid (${width}×${height})`);
  if (!Number.isInteger(step) || step < 1) throw new RangeError(`step must be a positive integer, got ${step}`);
  if (!(minValid > 0 && minValid <= 1)) throw new RangeError(`minValidFraction must be in (0, 1], got ${minValid}`);
  const lags = options.lags ?? logSpacedLags(Math.max(2, Math.floor(win / 4)), DEFAULT_WINDOW_LAGS);
  const ow = Math.ceil(width / step), oh = Math.ceil(height / step);
  const dim = new Float32Array(ow * oh).fill(NaN), r2 = new Float32Array(ow * oh).fill(NaN);
  const crop = new Float32Array(win * win);
  let estimated = 0, sum = 0, min = Infinity, max = -Infinity;
  for (let j = 0; j < oh; j++) {
    const cy = Math.min(height, (j + 0.5) * step);
    const y0 = Math.max(0, Math.min(height - win, Math.round(cy - win / 2)));
    const sub: CellGeometry = {
      dx: geometry.dx.subarray(y0, y0 + win), dy: geometry.dy.subarray(y0, y0 + win),
      area: geometry.area.subarray(y0, y0 + win), geographic: geometry.geographic,
    };
    for (let i = 0; i < ow; i++) {
      const cx = Math.min(width, (i + 0.5) * step);
      const x0 = Math.max(0, Math.min(width - win, Math.round(cx - win / 2)));
      let valid = 0, lo = Infinity, hi = -Infinity;
      for (let y = 0; y < win; y++) {
        const row = data.subarray((y0 + y) * width + x0, (y0 + y) * width + x0 + win);
        crop.set(row, y * win);
        for (let x = 0; x < win; x++) { const v = row[x]; if (v === v) { valid++; if (v < lo) lo = v; if (v > hi) hi = v; } }
      }
      if (valid < minValid * win * win || !(hi > lo)) continue; // too sparse, or flat: no dimension
      const v = isotropicVariogram(makeGrid(crop, win, win), sub, { lags, range: "all" });
      const d = v.dimension.value;
      if (!Number.isFinite(d)) continue;
      dim[j * ow + i] = d; r2[j * ow + i] = v.fit.rSquared;
      estimated++; sum += d; if (d < min) min = d; if (d > max) max = d;
    }
    onProgress?.((j + 1) / oh);
  }
  return {
    method: "semivariogram dimension in moving windows, Mark & Aronson (1984)",
    dimension: makeGrid(dim, ow, oh), rSquared: makeGrid(r2, ow, oh),
    window: win, step, lags,
    units: { window: "cells", dimension: "dimensionless" },
    summary: { windows: ow * oh, estimated, min: estimated ? min : NaN, max: estimated ? max : NaN, mean: estimated ? sum / estimated : NaN },
  };
}
