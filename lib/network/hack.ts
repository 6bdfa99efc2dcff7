// Hack (1957), Studies of longitudinal stream profiles in Virginia and Maryland, USGS Prof. Paper 294-B:
// main-stream length L = C·A^h, fitted here over every sub-basin (the outlet of each link).
import { linearRegression, LinearFit } from "@/lib/stats/linear-regression";
import { studentTQuantile } from "@/lib/stats/student-t";
import { StreamNetwork, topologicalOrder, upstreamLinks } from "./model";
import { M2_PER_KM2, M_PER_KM } from "./units";

export interface HackOptions {
  /** fit only sub-basins at least this large, m²; default 0 (all) */
  minAreaM2?: number;
  /** confidence level of the intervals; default 0.95 */
  confidence?: number;
}

export interface HackResult {
  /** h, dimensionless */
  exponent: number;
  exponentCi: [number, number];
  exponentStdError: number;
  /** C in L[km] = C·A[km²]^h */
  coefficientKm: number;
  coefficientCi: [number, number];
  rSquared: number;
  confidence: number;
  /** sub-basins fitted and the area range they span */
  pointsFitted: number;
  minAreaKm2: number;
  maxAreaKm2: number;
  fit: LinearFit;
}

/** Main-stream length upstream of each link's downstream end, m: the link's `mainStreamLengthM` (the
 *  longest flow path from the divide, known from a DEM) when every link has one, else the longest path
 *  through the links to a source (the hillslope above the channel head is then not counted). */
export function mainStreamLength(network: StreamNetwork): Float64Array {
  const length = new Float64Array(network.links.length);
  if (network.links.length > 0 && network.links.every((l) => l.mainStreamLengthM !== undefined)) {
    network.links.forEach((l, i) => { length[i] = l.mainStreamLengthM!; });
    return length;
  }
  const up = upstreamLinks(network);
  for (const i of topologicalOrder(network)) {
    let longest = 0;
    for (const j of up[i]) longest = Math.max(longest, length[j]);
    length[i] = longest + network.links[i].lengthM;
  }
  return length;
}

/** Hack's law by least squares of ln L on ln A over sub-basins with known positive area. */
export function hack(network: StreamNetwork, options: HackOptions = {}): HackResult {
  const minAreaM2 = options.minAreaM2 ?? 0;
  const confidence = options.confidence ?? 0.95;
  if (!(minAreaM2 >= 0)) throw new RangeError(`minAreaM2 must be ≥ 0, got ${minAreaM2}`);
  const length = mainStreamLength(network);
  const x: number[] = [], y: number[] = [];
  let minArea = Infinity, maxArea = -Infinity;
  network.links.forEach((link, i) => {
    const a = link.areaM2;
    if (a > 0 && a >= minAreaM2 && length[i] > 0) {
      x.push(Math.log(a / M2_PER_KM2));
      y.push(Math.log(length[i] / M_PER_KM));
      minArea = Math.min(minArea, a); maxArea = Math.max(maxArea, a);
    }
  });
  if (x.length < 3) throw new RangeError(`Hack's law needs at least 3 sub-basins with known area, got ${x.length}`);
  const fit = linearRegression(x, y, confidence);
  const t = studentTQuantile(1 - (1 - confidence) / 2, x.length - 2);
  return {
    exponent: fit.slope,
    exponentCi: fit.slopeCi,
    exponentStdError: fit.slopeStdError,
    coefficientKm: Math.exp(fit.intercept),
    coefficientCi: [Math.exp(fit.intercept - t * fit.interceptStdError), Math.exp(fit.intercept + t * fit.interceptStdError)],
    rSquared: fit.rSquared,
    confidence,
    pointsFitted: x.length,
    minAreaKm2: minArea / M2_PER_KM2,
    maxAreaKm2: maxArea / M2_PER_KM2,
    fit,
  };
}
