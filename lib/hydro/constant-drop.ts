// Constant drop law: Broscoe (1959), Columbia Univ. Tech. Rep. 18 (ONR); threshold choice after Tarboton, Bras
// & Rodríguez-Iturbe (1991), Hydrol. Process. 5:81–100: the densest network whose order-1 streams drop as
// much, on average, as the higher-order ones.
import { StreamNetwork } from "@/lib/network/model";
import { strahlerStreams } from "@/lib/network/strahler";
import { studentTCdf } from "@/lib/stats/student-t";

/** |t| below which the mean drops count as equal: 2, the usual rule of thumb (from memory; close to
 *  the two-sided 5% point of t for the stream counts of a real network). */
export const CONSTANT_DROP_CRITICAL_T = 2;
/** most candidate thresholds one call evaluates (each extracts and orders a network) */
export const MAX_CANDIDATES = 200;

/** "pooled": Student's two-sample t with one variance; "welch": Welch (1947) unequal variances. */
export type DropVariance = "pooled" | "welch";

export interface DropTTest {
  t: number;
  /** degrees of freedom: n1 + n2 − 2 (pooled) or Welch–Satterthwaite */
  df: number;
  /** two-sided p-value */
  pValue: number;
}

/** Two-sample t statistic of mean(a) − mean(b); NaN statistics when a sample has fewer than 2 values
 *  or both variances are 0. */
export function dropTTest(a: ArrayLike<number>, b: ArrayLike<number>, variance: DropVariance): DropTTest {
  const s1 = sampleStats(a), s2 = sampleStats(b);
  if (s1.n < 2 || s2.n < 2) return { t: NaN, df: NaN, pValue: NaN };
  let se: number, df: number;
  if (variance === "pooled") {
    df = s1.n + s2.n - 2;
    const pooled = ((s1.n - 1) * s1.variance + (s2.n - 1) * s2.variance) / df;
    se = Math.sqrt(pooled * (1 / s1.n + 1 / s2.n));
  } else {
    const v1 = s1.variance / s1.n, v2 = s2.variance / s2.n;
    se = Math.sqrt(v1 + v2);
    df = (v1 + v2) ** 2 / ((v1 * v1) / (s1.n - 1) + (v2 * v2) / (s2.n - 1));
  }
  if (!(se > 0)) return { t: NaN, df, pValue: NaN };
  const t = (s1.mean - s2.mean) / se;
  return { t, df, pValue: 2 * (1 - studentTCdf(Math.abs(t), df)) };
}

function sampleStats(x: ArrayLike<number>): { n: number; mean: number; variance: number } {
  const n = x.length;
  let m = 0;
  for (let i = 0; i < n; i++) m += x[i];
  m /= n;
  let ss = 0;
  for (let i = 0; i < n; i++) ss += (x[i] - m) ** 2;
  return { n, mean: m, variance: n > 1 ? ss / (n - 1) : NaN };
}

export interface ConstantDropCandidate {
  thresholdM2: number;
  order1Streams: number;
  higherOrderStreams: number;
  /** mean drop of the order-1 streams, m */
  order1MeanDropM: number;
  /** mean drop of the streams of order ≥ 2, m */
  higherMeanDropM: number;
  t: number;
  df: number;
  pValue: number;
  /** |t| < criticalT */
  passes: boolean;
}

export interface ConstantDropResult {
  /** the smallest candidate that passes; null when none does */
  chosenThresholdM2: number | null;
  variance: DropVariance;
  criticalT: number;
  /** every candidate in increasing threshold order, so a user sees why one was chosen */
  candidates: ConstantDropCandidate[];
}

export interface ConstantDropOptions {
  /** candidate contributing-area thresholds, m² (sorted here) */
  thresholdsM2: number[];
  /** default "welch" */
  variance?: DropVariance;
  /** default CONSTANT_DROP_CRITICAL_T */
  criticalT?: number;
  signal?: AbortSignal;
}

/** The constant drop test over candidate thresholds. `networkAt` extracts the stream network at a
 *  threshold (from a DEM, or any other source), with link drops in m. */
export function constantDropThreshold(networkAt: (thresholdM2: number) => StreamNetwork, options: ConstantDropOptions): ConstantDropResult {
  const variance = options.variance ?? "welch";
  const criticalT = options.criticalT ?? CONSTANT_DROP_CRITICAL_T;
  const thresholds = [...options.thresholdsM2].sort((a, b) => a - b);
  if (thresholds.length === 0 || thresholds.length > MAX_CANDIDATES) {
    throw new RangeError(`give 1…${MAX_CANDIDATES} candidate thresholds, got ${thresholds.length}`);
  }
  if (!(thresholds[0] > 0)) throw new RangeError(`thresholds must be positive areas in m², got ${thresholds[0]}`);
  if (!(criticalT > 0)) throw new RangeError(`criticalT must be positive, got ${criticalT}`);
  const candidates: ConstantDropCandidate[] = [];
  for (const thresholdM2 of thresholds) {
    options.signal?.throwIfAborted();
    const streams = strahlerStreams(networkAt(thresholdM2));
    const low: number[] = [], high: number[] = [];
    for (let s = 0; s < streams.count; s++) (streams.order[s] === 1 ? low : high).push(streams.dropM[s]);
    const test = dropTTest(low, high, variance);
    candidates.push({
      thresholdM2,
      order1Streams: low.length,
      higherOrderStreams: high.length,
      order1MeanDropM: mean(low),
      higherMeanDropM: mean(high),
      ...test,
      passes: Math.abs(test.t) < criticalT,
    });
  }
  const chosen = candidates.find((c) => c.passes);
  return { chosenThresholdM2: chosen ? chosen.thresholdM2 : null, variance, criticalT, candidates };
}

function mean(x: number[]): number {
  return x.length ? x.reduce((a, b) => a + b, 0) / x.length : NaN;
}

/** `count` thresholds evenly spaced in log between `minM2` and `maxM2` (both included). */
export function logSpacedThresholds(minM2: number, maxM2: number, count: number): number[] {
  if (!(minM2 > 0) || !(maxM2 > minM2)) throw new RangeError(`need 0 < min < max, got ${minM2}, ${maxM2}`);
  if (!Number.isInteger(count) || count < 2 || count > MAX_CANDIDATES) {
    throw new RangeError(`count must be an integer in 2…${MAX_CANDIDATES}, got ${count}`);
  }
  const step = Math.log(maxM2 / minM2) / (count - 1);
  return Array.from({ length: count }, (_, i) => minM2 * Math.exp(i * step));
}
