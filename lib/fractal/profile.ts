// Dimension of a transect, D = 2 − H: by the semivariogram (Mark & Aronson 1984, Math. Geol. 16(7):671–683) and
// by the power spectrum P(k) ∝ k^−β with β = 2H + 1 = 5 − 2D (Voss 1988; Huang & Turcotte 1989).
import FFT from "fft.js";
import type { Grid } from "@/lib/raster/grid";
import type { CellGeometry } from "@/lib/raster/cell-geometry";
import { deriveFromSlope, fitLogLog, type Derived, type LogLogFit, type ScalingRange } from "./loglog-fit";
import { logSpacedLags, DEFAULT_LAG_COUNT, DEFAULT_MAX_LAG_FRACTION } from "./variogram";
import { nextPowerOfTwo } from "./power-spectrum";

/** Default number of log-spaced frequency bins of the profile spectrum. */
export const DEFAULT_PROFILE_BINS = 16;

export interface ProfileOptions {
  lags?: number[];
  bins?: number;
  /** user scaling range in metres (lag for the variogram, wavelength for the spectrum) */
  range?: ScalingRange;
}

export interface ProfileResult {
  units: { distance: "m"; dimension: "dimensionless" };
  samples: number;
  spacing: number;
  variogram: { method: string; distance: number[]; semivariance: number[]; pairs: number[]; fit: LogLogFit; hurst: Derived; dimension: Derived };
  /** null when the detrended profile is a straight line (no power to fit) */
  spectrum: { method: string; preparation: string; wavelength: number[]; power: number[]; fit: LogLogFit; beta: Derived; dimension: Derived } | null;
}

/** Residual energy, relative to the profile's variance, below which the detrended profile counts as a straight
 *  line: float rounding of a perfect ramp leaves ~1e-30. */
const STRAIGHT_LINE_ENERGY = 1e-20;

/** Both dimensions of a profile of equally spaced samples (`spacing` metres apart; NaN = nodata). */
export function profileDimension(z: ArrayLike<number>, spacing: number, options: ProfileOptions = {}): ProfileResult {
  const n = z.length;
  if (!(spacing > 0)) throw new RangeError(`sample spacing must be positive metres, got ${spacing}`);
  if (n < 16) throw new RangeError(`a profile needs at least 16 samples, got ${n}`);
  const lags = options.lags ?? logSpacedLags(Math.max(2, Math.floor(n * DEFAULT_MAX_LAG_FRACTION)), DEFAULT_LAG_COUNT);
  for (const h of lags) if (!Number.isInteger(h) || h < 1 || h >= n) throw new RangeError(`lags must be integers in [1, ${n - 1}], got ${h}`);
  const distance: number[] = [], semivariance: number[] = [], pairs: number[] = [];
  for (const h of lags) {
    let s = 0, c = 0;
    for (let i = 0; i + h < n; i++) { const e = z[i + h] - z[i]; if (e === e) { s += e * e; c++; } }
    if (c > 0) { distance.push(h * spacing); semivariance.push((0.5 * s) / c); pairs.push(c); }
  }
  const vfit = fitLogLog(distance, semivariance, { unit: "m", range: options.range });

  // spectrum: least-squares line removed, Hann window, nodata → 0, zero-padded to a power of two
  let m = 0, sx = 0, sz = 0, sxx = 0, sxz = 0;
  for (let i = 0; i < n; i++) { const v = z[i]; if (v === v) { m++; sx += i; sz += v; sxx += i * i; sxz += i * v; } }
  const slope = (sxz - (sx * sz) / m) / (sxx - (sx * sx) / m), icpt = (sz - slope * sx) / m;
  const size = nextPowerOfTwo(n);
  const input = new Float64Array(size);
  let energy = 0, residual = 0, variance = 0;
  for (let i = 0; i < n; i++) {
    const w = 0.5 - 0.5 * Math.cos((2 * Math.PI * i) / (n - 1));
    energy += w * w;
    const v = z[i];
    if (v === v) {
      const r = v - icpt - slope * i;
      input[i] = r * w; residual += r * r; variance += (v - sz / m) ** 2;
    }
  }
  const variogramPart = {
    method: "semivariogram, Mark & Aronson (1984)", distance, semivariance, pairs, fit: vfit,
    hurst: deriveFromSlope(vfit, 0, 0.5), dimension: deriveFromSlope(vfit, 2, -0.5),
  };
  const base = { units: { distance: "m" as const, dimension: "dimensionless" as const }, samples: n, spacing, variogram: variogramPart };
  if (!(residual > STRAIGHT_LINE_ENERGY * variance)) return { ...base, spectrum: null };
  const fft = new FFT(size);
  const out = fft.createComplexArray() as number[];
  fft.realTransform(out, input);
  const bins = options.bins ?? DEFAULT_PROFILE_BINS;
  const lnMin = Math.log(1), lnMax = Math.log(size / 2), lnStep = (lnMax - lnMin) / bins;
  const sum = new Float64Array(bins), cnt = new Float64Array(bins);
  for (let k = 1; k <= size / 2; k++) {
    const b = Math.min(bins - 1, Math.floor((Math.log(k) - lnMin) / lnStep));
    sum[b] += out[2 * k] * out[2 * k] + out[2 * k + 1] * out[2 * k + 1]; cnt[b]++;
  }
  const wavelength: number[] = [], power: number[] = [];
  for (let b = 0; b < bins; b++) {
    if (cnt[b] === 0) continue;
    const k = Math.exp(lnMin + (b + 0.5) * lnStep) / (size * spacing); // cycles per metre
    wavelength.push(1 / k); power.push(((sum[b] / cnt[b]) * spacing) / energy);
  }
  const sfit = fitLogLog(wavelength, power, { unit: "m", range: options.range });
  return {
    ...base,
    spectrum: {
      method: "power spectrum (Voss 1988; Huang & Turcotte 1989)",
      preparation: "least-squares line removed; Hann window; nodata set to 0; zero-padded to a power of two; mean power per log-spaced bin",
      wavelength, power, fit: sfit, beta: deriveFromSlope(sfit, 0, 1), dimension: deriveFromSlope(sfit, 2.5, -0.5),
    },
  };
}

export interface Transect {
  /** bilinear samples one cell apart along the line (NaN where a neighbour is nodata) */
  values: Float64Array;
  /** sample spacing, m */
  spacing: number;
}

/** Samples a straight transect between two points given in cell coordinates (column, row; cell centres are
 *  integers). The spacing in metres uses the cell geometry at the transect's middle row. */
export function sampleTransect(grid: Grid<Float32Array>, geometry: CellGeometry, from: [number, number], to: [number, number]): Transect {
  const { data, width, height } = grid;
  for (const [x, y] of [from, to]) {
    if (!(x >= 0 && x <= width - 1 && y >= 0 && y <= height - 1)) {
      throw new RangeError(`transect end (${x}, ${y}) lies outside the grid 0–${width - 1} × 0–${height - 1}`);
    }
  }
  const ddx = to[0] - from[0], ddy = to[1] - from[1];
  const cells = Math.hypot(ddx, ddy);
  const n = Math.floor(cells) + 1;
  if (n < 2) throw new RangeError("a transect needs two distinct ends");
  const values = new Float64Array(n);
  for (let k = 0; k < n; k++) {
    const t = n === 1 ? 0 : k / cells;
    const x = from[0] + t * ddx, y = from[1] + t * ddy;
    const x0 = Math.min(width - 2, Math.floor(x)), y0 = Math.min(height - 2, Math.floor(y));
    const fx = x - x0, fy = y - y0;
    const i = y0 * width + x0;
    values[k] = (1 - fy) * ((1 - fx) * data[i] + fx * data[i + 1]) + fy * ((1 - fx) * data[i + width] + fx * data[i + width + 1]);
  }
  const mid = Math.round((from[1] + to[1]) / 2);
  const metres = Math.hypot(ddx * geometry.dx[mid], ddy * geometry.dy[mid]);
  return { values, spacing: metres / cells };
}
