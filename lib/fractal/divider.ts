// Divider (ruler) method: Richardson (1961), General Systems Yearbook 6:139–187, as analysed by Mandelbrot (1967),
// Science 156:636–638 — walk a fixed chord G along the line; L(G) = n(G)·G ∝ G^(1−D).
import { deriveFromSlope, fitLogLog, type Derived, type LogLogFit, type ScalingRange } from "./loglog-fit";
import { checkPolylines, medianSegmentLength, pointDistance, type Polylines } from "./polylines";

/** Default number of log-spaced rulers. */
export const DEFAULT_RULER_COUNT = 12;
/** Bound on the root search for the chord's end within one segment; the secant steps converge in a few. */
const MAX_ROOT_ITERATIONS = 60;
/** The chord's end is accepted when its distance is within this fraction of G (1e-9 G: 0.2 mm at 200 km);
 *  far above rounding (1e-16), far below any ruler's meaning. */
const ROOT_TOLERANCE = 1e-9;

export const LEFTOVER_RULE =
  "L(G) = (whole chords + f)·G, where f·G is the straight distance from the last divider point to the end of " +
  "the polyline (f < 1); a polyline shorter than G contributes its end-to-end distance; polylines are summed";

export interface DividerOptions {
  /** rulers in metres; default DEFAULT_RULER_COUNT log-spaced from the median segment length to a quarter of
   *  the total polyline length */
  rulers?: number[];
  /** user scaling range in metres */
  range?: ScalingRange;
}

export interface DividerResult {
  method: string;
  units: { ruler: "m"; length: "m"; dimension: "dimensionless" };
  coordinates: Polylines["coordinates"];
  leftoverRule: string;
  rulers: number[];
  /** whole chords walked at each ruler, summed over the polylines */
  steps: number[];
  /** leftover fractions summed over the polylines */
  leftover: number[];
  /** measured length L(G), m */
  length: number[];
  fit: LogLogFit;
  dimension: Derived;
}

/** Walks one polyline with chord g; returns whole chords and the leftover fraction. The chord's end is the
 *  first point after the current one, along the polyline, at distance g (an intersection with the polyline,
 *  not a vertex). Segments are straight in the input coordinates (in lon/lat between dense vertices). */
function walk(line: Float64Array, g: number, dist: (x1: number, y1: number, x2: number, y2: number) => number,
  euclidean: boolean): { steps: number; leftover: number } {
  const nv = line.length / 2;
  let px = line[0], py = line[1];
  let seg = 0; // the current point lies on segment seg (vertex seg → seg + 1), at parameter u0
  let u0 = 0;
  let steps = 0;
  for (;;) {
    // a vertex within the tolerance of g is the chord's end: rounding must not carry the walk past it
    const reach = g * (1 - ROOT_TOLERANCE);
    let j = seg + 1;
    while (j < nv && dist(px, py, line[2 * j], line[2 * j + 1]) < reach) j++;
    if (j === nv) {
      return { steps, leftover: dist(px, py, line[2 * nv - 2], line[2 * nv - 1]) / g };
    }
    // the crossing is on segment j−1 → j, after u0 if it is the current segment, else after its start
    const lo0 = j - 1 === seg ? u0 : 0;
    const ax = line[2 * j - 2], ay = line[2 * j - 1], dx = line[2 * j] - ax, dy = line[2 * j + 1] - ay;
    let u: number;
    if (euclidean) {
      // |a + u·d − p|² = g²: the larger root leaves the circle
      const fx = ax - px, fy = ay - py;
      const A = dx * dx + dy * dy, B = 2 * (fx * dx + fy * dy), C = fx * fx + fy * fy - g * g;
      u = (-B + Math.sqrt(Math.max(0, B * B - 4 * A * C))) / (2 * A);
      u = Math.min(1, Math.max(lo0, u));
    } else {
      // regula falsi (Illinois variant) on f(u) = dist − g, f(lo) < 0 ≤ f(hi)
      let lo = lo0, hi = 1;
      let flo = dist(px, py, ax + lo * dx, ay + lo * dy) - g, fhi = dist(px, py, ax + dx, ay + dy) - g;
      u = hi;
      for (let it = 0, side = 0; it < MAX_ROOT_ITERATIONS && Math.abs(fhi) > ROOT_TOLERANCE * g; it++) {
        u = (lo * fhi - hi * flo) / (fhi - flo);
        const f = dist(px, py, ax + u * dx, ay + u * dy) - g;
        if (Math.abs(f) <= ROOT_TOLERANCE * g) break;
        if (f < 0) { lo = u; flo = f; if (side === -1) fhi /= 2; side = -1; }
        else { hi = u; fhi = f; if (side === 1) flo /= 2; side = 1; }
      }
    }
    px = ax + u * dx; py = ay + u * dy;
    seg = j - 1; u0 = u;
    steps++;
  }
}

export function divider(input: Polylines, options: DividerOptions = {}): DividerResult {
  checkPolylines(input);
  const dist = pointDistance(input.coordinates);
  const euclidean = input.coordinates === "metres";
  let rulers = options.rulers;
  if (!rulers) {
    let total = 0;
    for (const l of input.lines) for (let i = 2; i < l.length; i += 2) total += dist(l[i - 2], l[i - 1], l[i], l[i + 1]);
    const lo = medianSegmentLength(input), hi = total / 4;
    if (!(hi > lo)) throw new RangeError(`the polylines are too short for a ruler range (median segment ${lo} m, total ${total} m)`);
    rulers = Array.from({ length: DEFAULT_RULER_COUNT }, (_, i) => lo * (hi / lo) ** (i / (DEFAULT_RULER_COUNT - 1)));
  }
  for (const g of rulers) if (!(g > 0) || !Number.isFinite(g)) throw new RangeError(`rulers must be positive metres, got ${g}`);
  const steps: number[] = [], leftover: number[] = [], length: number[] = [];
  for (const g of rulers) {
    let n = 0, f = 0;
    for (const line of input.lines) { const w = walk(line, g, dist, euclidean); n += w.steps; f += w.leftover; }
    steps.push(n); leftover.push(f); length.push((n + f) * g);
  }
  const fit = fitLogLog(rulers, length, { unit: "m", range: options.range });
  return {
    method: "divider, Richardson (1961) / Mandelbrot (1967)",
    units: { ruler: "m", length: "m", dimension: "dimensionless" },
    coordinates: input.coordinates, leftoverRule: LEFTOVER_RULE,
    rulers: [...rulers], steps, leftover, length, fit, dimension: deriveFromSlope(fit, 1, -1),
  };
}
