// Tokunaga (1978), Geophys. Bull. Hokkaido Univ. 25:1–19; Peckham (1995), WRR 31(4):1023–1029; Tarboton
// (1996), J. Hydrol. 187:105–117: side tributaries T_{ω,ω−k} and their law T_k = a·c^(k−1).
import { linearRegression, LinearFit } from "@/lib/stats/linear-regression";
import { studentTQuantile } from "@/lib/stats/student-t";
import { StreamNetwork, upstreamLinks } from "./model";
import { strahlerStreams } from "./strahler";

export interface TokunagaOptions {
  /** confidence level of the intervals; default 0.95 */
  confidence?: number;
}

export interface TokunagaResult {
  highestOrder: number;
  /** sideCounts[ω][k]: side tributaries of order ω−k joining streams of order ω, summed (index 0 unused) */
  sideCounts: number[][];
  /** streamsOfOrder[ω] = N_ω */
  streamsOfOrder: number[];
  /** T_k for k = 1 … Ω−1: Σ_ω sideCounts[ω][k] / Σ_{ω>k} N_ω (streams pooled over orders); tk[0] is T_1 */
  tk: number[];
  /** a and c of T_k = a·c^(k−1), dimensionless; null with fewer than two positive T_k */
  a: number | null;
  c: number | null;
  aCi: [number, number] | null;
  cCi: [number, number] | null;
  rSquared: number | null;
  /** the k values fitted */
  kUsed: number[];
  fit: LinearFit | null;
}

/** Side-tributary counts and the Tokunaga law fitted by least squares of ln T_k on k − 1. */
export function tokunaga(network: StreamNetwork, options: TokunagaOptions = {}): TokunagaResult {
  const confidence = options.confidence ?? 0.95;
  if (network.links.length === 0) throw new RangeError("the network has no links");
  const streams = strahlerStreams(network);
  const { linkOrder, streamOfLink } = streams;
  let highestOrder = 0;
  for (let s = 0; s < streams.count; s++) highestOrder = Math.max(highestOrder, streams.order[s]);
  const sideCounts = Array.from({ length: highestOrder + 1 }, () => new Array<number>(highestOrder).fill(0));
  const streamsOfOrder = new Array<number>(highestOrder + 1).fill(0);
  for (let s = 0; s < streams.count; s++) streamsOfOrder[streams.order[s]]++;
  const up = upstreamLinks(network);
  for (let i = 0; i < network.links.length; i++) {
    const s = streamOfLink[i], w = linkOrder[i];
    const atHead = streams.headLink[s] === i;
    for (const j of up[i]) {
      if (streamOfLink[j] === s) continue; // the stream's own continuation
      if (atHead && linkOrder[j] === w - 1) continue; // the inflows that form the stream
      sideCounts[w][w - linkOrder[j]]++;
    }
  }
  const tk: number[] = [];
  for (let k = 1; k < highestOrder; k++) {
    let sides = 0, hosts = 0;
    for (let w = k + 1; w <= highestOrder; w++) { sides += sideCounts[w][k]; hosts += streamsOfOrder[w]; }
    tk.push(sides / hosts);
  }
  const kUsed: number[] = [], lnT: number[] = [];
  tk.forEach((t, i) => { if (t > 0) { kUsed.push(i + 1); lnT.push(Math.log(t)); } });
  if (kUsed.length < 2) {
    return { highestOrder, sideCounts, streamsOfOrder, tk, a: null, c: null, aCi: null, cCi: null, rSquared: null, kUsed, fit: null };
  }
  const fit = linearRegression(kUsed.map((k) => k - 1), lnT, confidence);
  const t = kUsed.length > 2 ? studentTQuantile(1 - (1 - confidence) / 2, kUsed.length - 2) : NaN;
  return {
    highestOrder, sideCounts, streamsOfOrder, tk,
    a: Math.exp(fit.intercept),
    c: Math.exp(fit.slope),
    aCi: [Math.exp(fit.intercept - t * fit.interceptStdError), Math.exp(fit.intercept + t * fit.interceptStdError)],
    cCi: [Math.exp(fit.slopeCi[0]), Math.exp(fit.slopeCi[1])],
    rSquared: fit.rSquared,
    kUsed,
    fit,
  };
}

/** Asymptotic Horton ratios of a Tokunaga (a, c) tree with unit links (Tokunaga 1978; Peckham 1995):
 *  R_B = [(2+a+c) + √((2+a+c)² − 8c)] / 2 and R_L = c. With a = 0 there are no side tributaries:
 *  every stream is one link and the tree is binary, R_B = 2 and R_L = 1, whatever c. */
export function tokunagaHortonRatios(a: number, c: number): { bifurcationRatio: number; lengthRatio: number } {
  if (!(a >= 0) || !(c > 0)) throw new RangeError(`Tokunaga parameters need a ≥ 0 and c > 0, got a = ${a}, c = ${c}`);
  if (a === 0) return { bifurcationRatio: 2, lengthRatio: 1 };
  const b = 2 + a + c;
  return { bifurcationRatio: (b + Math.sqrt(b * b - 8 * c)) / 2, lengthRatio: c };
}
