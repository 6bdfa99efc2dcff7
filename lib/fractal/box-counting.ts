// Box-counting dimension of a plane set (e.g. Falconer 2003, Fractal Geometry, 2nd ed., Wiley): N(s) boxes of
// side s meet the set, N(s) ∝ s^−D; for polylines the boxes a segment crosses by Amanatides & Woo (1987) traversal.
import type { Grid } from "@/lib/raster/grid";
import { WGS84_A } from "@/lib/raster/wgs84";
import { deriveFromSlope, fitLogLog, type Derived, type LogLogFit, type ScalingRange } from "./loglog-fit";
import { checkPolylines, medianSegmentLength, type Polylines } from "./polylines";

/** Fewest boxes across the set's larger extent at the coarsest side: at 1–2 boxes the count only sees the bbox. */
export const MIN_BOXES_ACROSS = 4;

export interface BoxCountingResult {
  method: string;
  units: { side: string; count: "boxes"; dimension: "dimensionless" };
  /** how lon/lat were made planar, when they were */
  projection?: string;
  sides: number[];
  counts: number[];
  fit: LogLogFit;
  dimension: Derived;
}

function result(sides: number[], counts: number[], unit: string, range: ScalingRange | undefined,
  projection?: string): BoxCountingResult {
  const fit = fitLogLog(sides, counts, { unit, range });
  return {
    method: "box counting",
    units: { side: unit, count: "boxes", dimension: "dimensionless" },
    ...(projection ? { projection } : {}),
    sides, counts, fit, dimension: deriveFromSlope(fit, 0, -1),
  };
}

export interface MaskBoxCountingOptions {
  /** box sides in cells; default powers of two from 1 up to a quarter of the larger side */
  sides?: number[];
  /** cell size in metres; sides are then reported in metres, else in cells */
  cellSize?: number;
  range?: ScalingRange;
}

/** Counts s×s boxes (anchored at the grid's top-left cell) that hold at least one non-zero cell. */
export function boxCountMask(mask: Grid<Uint8Array>, options: MaskBoxCountingOptions = {}): BoxCountingResult {
  const { data, width, height } = mask;
  const sides = options.sides ?? [];
  if (!options.sides) for (let s = 1; Math.max(width, height) / s >= MIN_BOXES_ACROSS; s *= 2) sides.push(s);
  for (const s of sides) if (!Number.isInteger(s) || s < 1) throw new RangeError(`box sides must be positive integers (cells), got ${s}`);
  if (options.cellSize !== undefined && !(options.cellSize > 0)) throw new RangeError(`cell size must be positive, got ${options.cellSize}`);
  let occupied = 0;
  for (let i = 0; i < data.length; i++) if (data[i] !== 0) occupied++;
  if (occupied === 0) throw new RangeError("the mask holds no set cell");
  const xs = new Int32Array(occupied), ys = new Int32Array(occupied);
  for (let i = 0, k = 0; i < data.length; i++) if (data[i] !== 0) { xs[k] = i % width; ys[k] = (i / width) | 0; k++; }
  const counts = sides.map((s) => {
    const bw = Math.ceil(width / s), marks = new Uint8Array(bw * Math.ceil(height / s));
    let n = 0;
    for (let k = 0; k < occupied; k++) {
      const b = ((ys[k] / s) | 0) * bw + ((xs[k] / s) | 0);
      if (marks[b] === 0) { marks[b] = 1; n++; }
    }
    return n;
  });
  const c = options.cellSize;
  return result(c ? sides.map((s) => s * c) : sides, counts, c ? "m" : "cell", options.range);
}

export interface LineBoxCountingOptions {
  /** box sides in metres; default powers of two times the median segment length, up to a quarter of the
   *  larger extent */
  sides?: number[];
  range?: ScalingRange;
}

export const LONLAT_PROJECTION =
  "equirectangular about the mean latitude φ0 on a sphere of radius WGS84 a: x = a·λ·cos φ0, y = a·φ";

/** Boxes met by a set of polylines. Lon/lat are first made planar by LONLAT_PROJECTION (adequate for sets a few
 *  degrees across, like a river network or a coast). Box grid anchored at the set's south-west corner. */
export function boxCountLines(input: Polylines, options: LineBoxCountingOptions = {}): BoxCountingResult {
  checkPolylines(input);
  let lines = input.lines;
  let projection: string | undefined;
  if (input.coordinates === "lonlat") {
    let latSum = 0, count = 0;
    for (const l of lines) for (let i = 1; i < l.length; i += 2) { latSum += l[i]; count++; }
    const k = Math.PI / 180, cos0 = Math.cos((latSum / count) * k);
    lines = lines.map((l) => l.map((v, i) => (i % 2 === 0 ? WGS84_A * v * k * cos0 : WGS84_A * v * k)));
    projection = LONLAT_PROJECTION;
  }
  let x0 = Infinity, y0 = Infinity, x1 = -Infinity, y1 = -Infinity;
  for (const l of lines) for (let i = 0; i < l.length; i += 2) {
    x0 = Math.min(x0, l[i]); x1 = Math.max(x1, l[i]); y0 = Math.min(y0, l[i + 1]); y1 = Math.max(y1, l[i + 1]);
  }
  const extent = Math.max(x1 - x0, y1 - y0);
  let sides = options.sides;
  if (!sides) {
    const s0 = medianSegmentLength({ lines, coordinates: "metres" });
    sides = [];
    for (let s = s0; extent / s >= MIN_BOXES_ACROSS; s *= 2) sides.push(s);
  }
  for (const s of sides) if (!(s > 0) || !Number.isFinite(s)) throw new RangeError(`box sides must be positive metres, got ${s}`);
  const counts = sides.map((s) => {
    const across = Math.floor(extent / s) + 2; // box columns/rows: keys stay unique
    const boxes = new Set<number>();
    for (const l of lines) {
      for (let i = 2; i < l.length; i += 2) {
        const ax = (l[i - 2] - x0) / s, ay = (l[i - 1] - y0) / s, bx = (l[i] - x0) / s, by = (l[i + 1] - y0) / s;
        let ix = Math.floor(ax), iy = Math.floor(ay);
        const ex = Math.floor(bx), ey = Math.floor(by);
        const dx = bx - ax, dy = by - ay;
        const stepX = dx > 0 ? 1 : -1, stepY = dy > 0 ? 1 : -1;
        const tdx = dx === 0 ? Infinity : Math.abs(1 / dx), tdy = dy === 0 ? Infinity : Math.abs(1 / dy);
        let tx = dx === 0 ? Infinity : ((dx > 0 ? ix + 1 : ix) - ax) / dx;
        let ty = dy === 0 ? Infinity : ((dy > 0 ? iy + 1 : iy) - ay) / dy;
        boxes.add(iy * across + ix);
        // at most one step per box boundary crossed
        for (let n = Math.abs(ex - ix) + Math.abs(ey - iy); n > 0 && (ix !== ex || iy !== ey); n--) {
          if (tx < ty) { ix += stepX; tx += tdx; } else { iy += stepY; ty += tdy; }
          boxes.add(iy * across + ix);
        }
      }
    }
    return boxes.size;
  });
  return result(sides, counts, "m", options.range, projection);
}
