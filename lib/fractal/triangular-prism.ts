// Triangular prism surface area: Clarke (1986), Computers & Geosciences 12(5):713–722 — the area of the four
// triangles joining the corners of each s×s square to its centre (mean of the corners) scales as s^(2−D).
import type { Grid } from "@/lib/raster/grid";
import type { CellGeometry } from "@/lib/raster/cell-geometry";
import { deriveFromSlope, fitLogLog, type Derived, type LogLogFit, type ScalingRange } from "./loglog-fit";

/** Fewest squares along the shorter side at the coarsest step. */
export const MIN_SQUARES_PER_SIDE = 4;

export interface TriangularPrismOptions {
  /** user scaling range in metres (square side) */
  range?: ScalingRange;
}

export interface TriangularPrismResult {
  method: string;
  units: { side: "m"; areaRatio: "m²/m²"; dimension: "dimensionless" };
  /** square sides in cells (powers of two) */
  steps: number[];
  /** square sides, m (step × mean √(dx·dy)) */
  scales: number[];
  /** prism surface area over the planimetric area of the squares counted (squares with a nodata corner are
   *  skipped, so the ratio, not the raw area, is comparable across steps) */
  areaRatio: number[];
  fit: LogLogFit;
  dimension: Derived;
}

/** Area of the triangle (0,0,0), (ux,uy,uz), (vx,vy,vz). */
function triangleArea(ux: number, uy: number, uz: number, vx: number, vy: number, vz: number): number {
  const cx = uy * vz - uz * vy, cy = uz * vx - ux * vz, cz = ux * vy - uy * vx;
  return 0.5 * Math.sqrt(cx * cx + cy * cy + cz * cz);
}

export function triangularPrism(grid: Grid<Float32Array>, geometry: CellGeometry, options: TriangularPrismOptions = {}): TriangularPrismResult {
  const { data, width, height } = grid;
  if (geometry.dx.length !== height) throw new RangeError(`cell geometry has ${geometry.dx.length} rows, grid has ${height}`);
  if (Math.min(width, height) - 1 < 2 * MIN_SQUARES_PER_SIDE) {
    throw new RangeError(`the triangular prism method needs at least ${2 * MIN_SQUARES_PER_SIDE + 1} cells a side, got ${width}×${height}`);
  }
  let meanCell = 0;
  for (let r = 0; r < height; r++) meanCell += Math.sqrt(geometry.dx[r] * geometry.dy[r]) / height;
  const steps: number[] = [], scales: number[] = [], areaRatio: number[] = [];
  for (let s = 1; Math.floor((Math.min(width, height) - 1) / s) >= MIN_SQUARES_PER_SIDE; s *= 2) {
    let area = 0, planimetric = 0;
    for (let y = 0; y + s < height; y += s) {
      // the square's horizontal sides from the widths of its top and bottom rows, its height between row centres
      const sx = s * 0.5 * (geometry.dx[y] + geometry.dx[y + s]);
      let sy = 0;
      for (let r = y; r < y + s; r++) sy += 0.5 * (geometry.dy[r] + geometry.dy[r + 1]);
      const hx = 0.5 * sx, hy = 0.5 * sy;
      // row views: V8 keeps a fresh view's base and length in registers (measured faster than offsets)
      const top = data.subarray(y * width, (y + 1) * width), bottom = data.subarray((y + s) * width, (y + s + 1) * width);
      let rowArea = 0, squares = 0;
      for (let x = 0; x + s < width; x += s) {
        const a = top[x], b = top[x + s], c = bottom[x + s], d = bottom[x];
        const e = 0.25 * (a + b + c + d);
        if (e !== e) continue; // a nodata corner
        // corners a (0,0), b (sx,0), c (sx,sy), d (0,sy); centre (hx,hy); vectors from the centre
        const ax = -hx, ay = -hy, az = a - e, bx = hx, by = -hy, bz = b - e;
        const cx = hx, cy = hy, cz = c - e, dx = -hx, dy = hy, dz = d - e;
        rowArea += triangleArea(ax, ay, az, bx, by, bz) + triangleArea(bx, by, bz, cx, cy, cz) +
          triangleArea(cx, cy, cz, dx, dy, dz) + triangleArea(dx, dy, dz, ax, ay, az);
        squares++;
      }
      area += rowArea; planimetric += squares * sx * sy;
    }
    if (planimetric > 0) { steps.push(s); scales.push(s * meanCell); areaRatio.push(area / planimetric); }
  }
  const fit = fitLogLog(scales, areaRatio, { unit: "m", range: options.range });
  return {
    method: "triangular prism, Clarke (1986)",
    units: { side: "m", areaRatio: "m²/m²", dimension: "dimensionless" },
    steps, scales, areaRatio, fit, dimension: deriveFromSlope(fit, 2, -1),
  };
}
