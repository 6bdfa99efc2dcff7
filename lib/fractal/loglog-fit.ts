// Log–log least squares with an automatic scaling range: the widest window of points that stays straight
// (the scale-break caution of Mark & Aronson 1984, Math. Geol. 16(7):671–683); OLS by lib/stats/linear-regression.
import { linearRegression } from "@/lib/stats/linear-regression";

/** Fewest points a window may hold: three leave one residual degree of freedom; four give a usable SE and let a bend show. */
export const MIN_WINDOW_POINTS = 4;
/** Largest |residual| (natural-log units) a point may have from its window's own line: 0.05 ≈ 5 % in the
 *  measure, above the scatter of the estimators on synthetic surfaces and below the bend of a scale break. */
export const MAX_ABS_RESIDUAL = 0.05;
/** Least R² a window must reach: guards against a window that is "straight" only because it is flat and noisy. */
export const MIN_R_SQUARED = 0.98;

export const SCALING_RANGE_RULE =
  `widest contiguous window (span in ln scale, then more points, then smaller residual sum) of at least ` +
  `${MIN_WINDOW_POINTS} points whose own least-squares line has every |residual| ≤ ${MAX_ABS_RESIDUAL} ` +
  `(natural-log units) and R² ≥ ${MIN_R_SQUARED}; if no window passes, all points are fitted and ` +
  `criterionMet is false`;

export interface LogLogPoint {
  /** scale in `range.unit` (lag, box side, ruler, wavelength) */
  scale: number;
  /** the measure at that scale (semivariance, count, length, area, power) */
  measure: number;
  /** whether the point lies in the fitted range */
  used: boolean;
}

export interface ScaleBreak {
  /** geometric mean of the last used and the first unused scale */
  scale: number;
  side: "below" | "above";
}

export interface LogLogFit {
  points: LogLogPoint[];
  range: { min: number; max: number; unit: string };
  /** how the range was chosen */
  rangeSource: "automatic" | "user" | "all";
  /** the automatic rule, stated; or the user range */
  rule: string;
  /** false when no window met the automatic criterion (all points fitted) */
  criterionMet: boolean;
  n: number;
  slope: number;
  intercept: number;
  slopeSe: number;
  slopeCi: [number, number];
  rSquared: number;
  maxAbsResidual: number;
  /** scales at which the fitted range ends while more points exist beyond it */
  breaks: ScaleBreak[];
}

export interface LogLogOptions {
  /** unit of the scales, reported in `range.unit` */
  unit: string;
  /** user scaling range in the scale's unit, or "all" to fit every usable point; overrides the automatic rule */
  range?: ScalingRange;
}

export type ScalingRange = { min: number; max: number } | "all";

/** A dimension (or exponent) derived as offset + factor · slope, with its SE and 95 % CI. */
export interface Derived {
  value: number;
  se: number;
  ci: [number, number];
}

export function deriveFromSlope(fit: LogLogFit, offset: number, factor: number): Derived {
  const a = offset + factor * fit.slopeCi[0];
  const b = offset + factor * fit.slopeCi[1];
  return { value: offset + factor * fit.slope, se: Math.abs(factor) * fit.slopeSe, ci: a <= b ? [a, b] : [b, a] };
}

interface WindowFit { lo: number; hi: number; fit: ReturnType<typeof linearRegression>; maxRes: number }

function fitWindow(lx: Float64Array, ly: Float64Array, lo: number, hi: number): WindowFit {
  const x = lx.subarray(lo, hi + 1), y = ly.subarray(lo, hi + 1);
  const fit = linearRegression(x, y);
  let maxRes = 0;
  for (let i = 0; i < x.length; i++) maxRes = Math.max(maxRes, Math.abs(y[i] - fit.intercept - fit.slope * x[i]));
  return { lo, hi, fit, maxRes };
}

/** Fits ln(measure) = intercept + slope · ln(scale). Points with a non-positive or non-finite scale or
 *  measure are kept in `points` as unused (they cannot be logged). */
export function fitLogLog(scales: ArrayLike<number>, measures: ArrayLike<number>, options: LogLogOptions): LogLogFit {
  if (scales.length !== measures.length) {
    throw new RangeError(`${scales.length} scales but ${measures.length} measures`);
  }
  const order = Array.from({ length: scales.length }, (_, i) => i).sort((a, b) => scales[a] - scales[b]);
  const ok = order.filter((i) => scales[i] > 0 && measures[i] > 0 && Number.isFinite(scales[i]) && Number.isFinite(measures[i]));
  const lx = Float64Array.from(ok, (i) => Math.log(scales[i]));
  const ly = Float64Array.from(ok, (i) => Math.log(measures[i]));
  let best: WindowFit | undefined;
  let rangeSource: LogLogFit["rangeSource"] = "automatic";
  let rule = SCALING_RANGE_RULE;
  let criterionMet = true;
  if (options.range === "all") {
    if (lx.length < 2) throw new RangeError(`a log–log fit needs at least 2 usable points, got ${lx.length}`);
    best = fitWindow(lx, ly, 0, lx.length - 1);
    rangeSource = "all";
    rule = "every usable point";
  } else if (options.range) {
    const { min, max } = options.range;
    if (!(min > 0) || !(max > min)) throw new RangeError(`scaling range must satisfy 0 < min < max, got ${min}–${max}`);
    const inside = ok.map((i, k) => (scales[i] >= min && scales[i] <= max ? k : -1)).filter((k) => k >= 0);
    if (inside.length < 2) {
      throw new RangeError(`the scaling range ${min}–${max} ${options.unit} holds ${inside.length} point(s); at least 2 are needed`);
    }
    best = fitWindow(lx, ly, inside[0], inside[inside.length - 1]);
    rangeSource = "user";
    rule = `user range ${min}–${max} ${options.unit}`;
  } else {
    if (lx.length < 2) throw new RangeError(`a log–log fit needs at least 2 usable points, got ${lx.length}`);
    const m = lx.length;
    for (let lo = 0; lo < m; lo++) {
      for (let hi = lo + MIN_WINDOW_POINTS - 1; hi < m; hi++) {
        const w = fitWindow(lx, ly, lo, hi);
        if (w.maxRes > MAX_ABS_RESIDUAL || w.fit.rSquared < MIN_R_SQUARED) continue;
        if (!best) { best = w; continue; }
        const span = lx[hi] - lx[lo], bestSpan = lx[best.hi] - lx[best.lo];
        const better = span > bestSpan + 1e-12 ||
          (Math.abs(span - bestSpan) <= 1e-12 && (hi - lo > best.hi - best.lo ||
            (hi - lo === best.hi - best.lo && w.fit.rss < best.fit.rss)));
        if (better) best = w;
      }
    }
    if (!best) { best = fitWindow(lx, ly, 0, m - 1); criterionMet = false; }
  }
  const used = new Set(ok.slice(best.lo, best.hi + 1));
  const points = order.map((i) => ({ scale: scales[i], measure: measures[i], used: used.has(i) }));
  const breaks: ScaleBreak[] = [];
  if (best.lo > 0) breaks.push({ scale: Math.exp(0.5 * (lx[best.lo - 1] + lx[best.lo])), side: "below" });
  if (best.hi < lx.length - 1) breaks.push({ scale: Math.exp(0.5 * (lx[best.hi] + lx[best.hi + 1])), side: "above" });
  const f = best.fit;
  return {
    points,
    range: { min: scales[ok[best.lo]], max: scales[ok[best.hi]], unit: options.unit },
    rangeSource, rule, criterionMet,
    n: f.n, slope: f.slope, intercept: f.intercept, slopeSe: f.slopeStdError, slopeCi: f.slopeCi,
    rSquared: f.rSquared, maxAbsResidual: best.maxRes, breaks,
  };
}
