// Ordinary least squares y = a + b·x with standard errors and a t-based confidence interval
// (e.g. Montgomery, Peck & Vining, Introduction to Linear Regression Analysis, ch. 2).
import { studentTQuantile } from "./student-t";

export interface LinearFit {
  /** number of points fitted */
  n: number;
  slope: number;
  intercept: number;
  /** standard error of the slope (NaN with fewer than 3 points) */
  slopeStdError: number;
  interceptStdError: number;
  /** confidence interval of the slope at `confidence` (NaN bounds with fewer than 3 points) */
  slopeCi: [number, number];
  confidence: number;
  /** coefficient of determination; 1 when every point lies on the line */
  rSquared: number;
  /** residual sum of squares */
  rss: number;
}

export function linearRegression(x: ArrayLike<number>, y: ArrayLike<number>, confidence = 0.95): LinearFit {
  const n = x.length;
  if (n !== y.length) throw new RangeError(`x has ${n} values and y has ${y.length}`);
  if (n < 2) throw new RangeError(`a line needs at least 2 points, got ${n}`);
  if (!(confidence > 0 && confidence < 1)) throw new RangeError(`confidence must be in (0, 1), got ${confidence}`);
  let mx = 0, my = 0;
  for (let i = 0; i < n; i++) { mx += x[i]; my += y[i]; }
  mx /= n; my /= n;
  let sxx = 0, sxy = 0, syy = 0;
  for (let i = 0; i < n; i++) {
    const dx = x[i] - mx, dy = y[i] - my;
    sxx += dx * dx; sxy += dx * dy; syy += dy * dy;
  }
  if (sxx === 0) throw new RangeError("all x values are equal: the slope is undefined");
  const slope = sxy / sxx;
  const intercept = my - slope * mx;
  let rss = 0;
  for (let i = 0; i < n; i++) {
    const r = y[i] - (intercept + slope * x[i]);
    rss += r * r;
  }
  const rSquared = syy === 0 ? 1 : Math.max(0, 1 - rss / syy);
  let slopeStdError = NaN, interceptStdError = NaN, slopeCi: [number, number] = [NaN, NaN];
  if (n > 2) {
    const s2 = rss / (n - 2);
    slopeStdError = Math.sqrt(s2 / sxx);
    interceptStdError = Math.sqrt(s2 * (1 / n + (mx * mx) / sxx));
    const t = studentTQuantile(1 - (1 - confidence) / 2, n - 2);
    slopeCi = [slope - t * slopeStdError, slope + t * slopeStdError];
  }
  return { n, slope, intercept, slopeStdError, interceptStdError, slopeCi, confidence, rSquared, rss };
}
