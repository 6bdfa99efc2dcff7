// Student's t distribution: CDF through the regularized incomplete beta function (continued fraction,
// modified Lentz; Press et al. 2007, Numerical Recipes 3rd ed., §6.4) and its quantile by bisection.

const MAX_ITERATIONS = 300; // the continued fraction converges in < 100 terms for the df used here
const EPSILON = 1e-15; // relative change at which the continued fraction has converged
const TINY = 1e-300; // guards the Lentz recurrences against division by zero

function logGamma(x: number): number {
  // Lanczos approximation, g = 7, n = 9 (Numerical Recipes §6.1); |error| < 1e-15 for x > 0
  const c = [
    0.99999999999980993, 676.5203681218851, -1259.1392167224028, 771.32342877765313,
    -176.61502916214059, 12.507343278686905, -0.13857109526572012, 9.9843695780195716e-6,
    1.5056327351493116e-7,
  ];
  if (x < 0.5) return Math.log(Math.PI / Math.abs(Math.sin(Math.PI * x))) - logGamma(1 - x);
  x -= 1;
  let a = c[0];
  const t = x + 7.5;
  for (let i = 1; i < 9; i++) a += c[i] / (x + i);
  return 0.5 * Math.log(2 * Math.PI) + (x + 0.5) * Math.log(t) - t + Math.log(a);
}

function betaContinuedFraction(a: number, b: number, x: number): number {
  const qab = a + b, qap = a + 1, qam = a - 1;
  let c = 1, d = 1 - (qab * x) / qap;
  if (Math.abs(d) < TINY) d = TINY;
  d = 1 / d;
  let h = d;
  for (let m = 1; m <= MAX_ITERATIONS; m++) {
    const m2 = 2 * m;
    let aa = (m * (b - m) * x) / ((qam + m2) * (a + m2));
    d = 1 + aa * d; if (Math.abs(d) < TINY) d = TINY;
    c = 1 + aa / c; if (Math.abs(c) < TINY) c = TINY;
    d = 1 / d; h *= d * c;
    aa = (-(a + m) * (qab + m) * x) / ((a + m2) * (qap + m2));
    d = 1 + aa * d; if (Math.abs(d) < TINY) d = TINY;
    c = 1 + aa / c; if (Math.abs(c) < TINY) c = TINY;
    d = 1 / d;
    const del = d * c;
    h *= del;
    if (Math.abs(del - 1) < EPSILON) return h;
  }
  return h;
}

/** Regularized incomplete beta I_x(a, b). */
export function regularizedBeta(x: number, a: number, b: number): number {
  if (x <= 0) return 0;
  if (x >= 1) return 1;
  const front = Math.exp(logGamma(a + b) - logGamma(a) - logGamma(b) + a * Math.log(x) + b * Math.log(1 - x));
  return x < (a + 1) / (a + b + 2)
    ? (front * betaContinuedFraction(a, b, x)) / a
    : 1 - (front * betaContinuedFraction(b, a, 1 - x)) / b;
}

/** P(T ≤ t) for Student's t with `df` degrees of freedom. */
export function studentTCdf(t: number, df: number): number {
  if (!(df > 0)) throw new RangeError(`degrees of freedom must be positive, got ${df}`);
  const tail = 0.5 * regularizedBeta(df / (df + t * t), df / 2, 0.5);
  return t >= 0 ? 1 - tail : tail;
}

// Fits in moving windows ask for the same few (p, df) pairs many thousands of times.
const quantileCache = new Map<string, number>();
const QUANTILE_CACHE_LIMIT = 4096;

/** The t value with P(T ≤ t) = p. */
export function studentTQuantile(p: number, df: number): number {
  if (!(p > 0 && p < 1)) throw new RangeError(`probability must be in (0, 1), got ${p}`);
  if (p === 0.5) return 0;
  if (p < 0.5) return -studentTQuantile(1 - p, df);
  const key = `${p}|${df}`;
  const cached = quantileCache.get(key);
  if (cached !== undefined) return cached;
  const t = bisectQuantile(p, df);
  if (quantileCache.size < QUANTILE_CACHE_LIMIT) quantileCache.set(key, t);
  return t;
}

function bisectQuantile(p: number, df: number): number {
  let lo = 0, hi = 1;
  while (studentTCdf(hi, df) < p) hi *= 2; // df ≥ 1 keeps this below 2^40 for p ≤ 1 − 1e-12
  for (let i = 0; i < 200 && hi - lo > 1e-13 * hi; i++) {
    const mid = 0.5 * (lo + hi);
    if (studentTCdf(mid, df) < p) lo = mid; else hi = mid;
  }
  return 0.5 * (lo + hi);
}
