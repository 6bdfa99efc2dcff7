// Horton (1945), Geol. Soc. Am. Bull. 56(3):275–370 (numbers, lengths, slopes); Schumm (1956), Geol. Soc.
// Am. Bull. 67(5):597–646 (areas). Ratios by least squares of ln(value) on order (common practice).
import { linearRegression, LinearFit } from "@/lib/stats/linear-regression";
import { StreamNetwork } from "./model";
import { strahlerStreams, StrahlerStreams } from "./strahler";

export interface HortonOptions {
  /** leave the highest order out of every fit (it holds one or a few streams); default false */
  excludeHighestOrder?: boolean;
  /** confidence level of the intervals; default 0.95 */
  confidence?: number;
}

/** Per-order means of Strahler streams; units are in the key names (m, m², m/m). */
export interface HortonOrderRow {
  order: number;
  streamCount: number;
  meanLengthM: number;
  meanAreaM2: number;
  /** mean of the streams' drop / length, m/m; NaN when no stream of this order has a known drop */
  meanSlope: number;
}

/** One Horton ratio (dimensionless) with the regression it came from. */
export interface HortonRatio {
  value: number;
  /** interval at `confidence`: the slope's t-based interval carried through exp */
  ci: [number, number];
  confidence: number;
  /** standard error of ln(ratio), i.e. of the fitted slope */
  lnStdError: number;
  /** standard error of the ratio by the delta method: value × lnStdError */
  stdError: number;
  rSquared: number;
  ordersUsed: number[];
  /** the points fitted: ln of the per-order value against order */
  lnValues: number[];
  fit: LinearFit;
}

export interface HortonResult {
  highestOrder: number;
  /** orders offered to the fits (all, or all but the highest) */
  ordersUsed: number[];
  table: HortonOrderRow[];
  /** R_B from N_ω = R_B^(Ω−ω); null with fewer than two usable orders */
  bifurcation: HortonRatio | null;
  /** R_L from L̄_ω = L̄_1 R_L^(ω−1) */
  length: HortonRatio | null;
  /** R_A from Ā_ω = Ā_1 R_A^(ω−1) */
  area: HortonRatio | null;
  /** R_S from S̄_ω = S̄_1 R_S^−(ω−1); null when drops are unknown */
  slope: HortonRatio | null;
}

/** Per-order table of the streams (count, mean length, area and slope). */
export function hortonTable(streams: StrahlerStreams): HortonOrderRow[] {
  let highest = 0;
  for (let s = 0; s < streams.count; s++) highest = Math.max(highest, streams.order[s]);
  const count = new Float64Array(highest + 1), length = new Float64Array(highest + 1);
  const area = new Float64Array(highest + 1), slope = new Float64Array(highest + 1);
  const slopeCount = new Float64Array(highest + 1);
  for (let s = 0; s < streams.count; s++) {
    const w = streams.order[s];
    count[w]++;
    length[w] += streams.lengthM[s];
    area[w] += streams.areaM2[s];
    const g = streams.dropM[s] / streams.lengthM[s];
    if (Number.isFinite(g)) { slope[w] += g; slopeCount[w]++; }
  }
  const table: HortonOrderRow[] = [];
  for (let w = 1; w <= highest; w++) {
    table.push({
      order: w,
      streamCount: count[w],
      meanLengthM: length[w] / count[w],
      meanAreaM2: area[w] / count[w],
      meanSlope: slopeCount[w] > 0 ? slope[w] / slopeCount[w] : NaN,
    });
  }
  return table;
}

/** Fits ln(value) on order over the rows whose value is positive; `sign` −1 for laws that fall with order. */
function fitRatio(rows: HortonOrderRow[], value: (r: HortonOrderRow) => number, sign: 1 | -1, confidence: number): HortonRatio | null {
  const used = rows.filter((r) => value(r) > 0 && Number.isFinite(value(r)));
  if (used.length < 2) return null;
  const x = used.map((r) => r.order), y = used.map((r) => Math.log(value(r)));
  const fit = linearRegression(x, y, confidence);
  const ratio = Math.exp(sign * fit.slope);
  const bounds = [Math.exp(sign * fit.slopeCi[0]), Math.exp(sign * fit.slopeCi[1])];
  return {
    value: ratio,
    ci: [Math.min(bounds[0], bounds[1]), Math.max(bounds[0], bounds[1])],
    confidence,
    lnStdError: fit.slopeStdError,
    stdError: ratio * fit.slopeStdError,
    rSquared: fit.rSquared,
    ordersUsed: x,
    lnValues: y,
    fit,
  };
}

/** Horton ratios of a stream network, each with its regression evidence. */
export function horton(network: StreamNetwork, options: HortonOptions = {}): HortonResult {
  const confidence = options.confidence ?? 0.95;
  if (!(confidence > 0 && confidence < 1)) throw new RangeError(`confidence must be in (0, 1), got ${confidence}`);
  if (network.links.length === 0) throw new RangeError("the network has no links");
  const table = hortonTable(strahlerStreams(network));
  const highestOrder = table.length;
  const rows = options.excludeHighestOrder ? table.slice(0, -1) : table;
  return {
    highestOrder,
    ordersUsed: rows.map((r) => r.order),
    table,
    bifurcation: fitRatio(rows, (r) => r.streamCount, -1, confidence),
    length: fitRatio(rows, (r) => r.meanLengthM, 1, confidence),
    area: fitRatio(rows, (r) => r.meanAreaM2, 1, confidence),
    slope: fitRatio(rows, (r) => r.meanSlope, -1, confidence),
  };
}
