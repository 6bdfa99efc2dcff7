// Cell sizes in metres per row: constant for projected grids; on geographic grids, WGS84 per-row widths,
// heights and areas, the areas by Snyder (1987), Map Projections — A Working Manual, USGS PP 1395, eq. 3-12.
import { WGS84_A, WGS84_E2 } from "@/lib/raster/wgs84";

/** Per-row cell geometry in metres. Row r spans the r-th row of the grid, north first. */
export interface CellGeometry {
  /** east–west cell width of each row, m */
  dx: Float64Array;
  /** north–south cell height of each row, m */
  dy: Float64Array;
  /** cell area of each row, m² */
  area: Float64Array;
  /** true when the grid is in a geographic CRS (widths shrink towards the poles) */
  geographic: boolean;
}

/** A projected grid: every cell is dx × dy metres. */
export function projectedCellGeometry(height: number, dxMetres: number, dyMetres: number): CellGeometry {
  if (!(dxMetres > 0) || !(dyMetres > 0)) {
    throw new RangeError(`cell size must be positive, got ${dxMetres} × ${dyMetres} m`);
  }
  return {
    dx: new Float64Array(height).fill(dxMetres),
    dy: new Float64Array(height).fill(dyMetres),
    area: new Float64Array(height).fill(dxMetres * dyMetres),
    geographic: false,
  };
}

const DEG = Math.PI / 180;
const E = Math.sqrt(WGS84_E2);

/** Snyder (1987) eq. 3-12's q(φ), the authalic function: area between the equator and φ is ∝ q. */
function authalicQ(sinPhi: number): number {
  const es = E * sinPhi;
  return (1 - WGS84_E2) * (sinPhi / (1 - es * es) + Math.log((1 + es) / (1 - es)) / (2 * E));
}

/** Meridional radius of curvature M(φ) (Snyder 1987, eq. 4-18). */
function meridionalRadius(phi: number): number {
  const s = Math.sin(phi);
  return (WGS84_A * (1 - WGS84_E2)) / Math.pow(1 - WGS84_E2 * s * s, 1.5);
}

/** Prime-vertical radius of curvature N(φ) (Snyder 1987, eq. 4-20). */
function primeVerticalRadius(phi: number): number {
  const s = Math.sin(phi);
  return WGS84_A / Math.sqrt(1 - WGS84_E2 * s * s);
}

/**
 * A geographic grid on WGS84, per row (north first):
 * - dx: length of the parallel arc through the row's cell centres across one cell, N(φ)·cos φ·Δλ;
 *   between neighbouring centres it differs from the geodesic by a relative (Δλ·sin φ)²/24, under
 *   1e-9 for cells of 15″ or less;
 * - dy: meridian arc between the row's north and south edges, ∫M(φ)dφ by Simpson's rule (the
 *   rule's error, of order Δφ⁵, is below a micrometre even for 1° cells);
 * - area: exact ellipsoidal area of the cell between its parallels and meridians (Snyder eq. 3-12).
 */
export function geographicCellGeometry(height: number, originLat: number, pixelSizeXDeg: number, pixelSizeYDeg: number): CellGeometry {
  if (!Number.isInteger(height) || height <= 0) throw new RangeError(`height must be a positive integer, got ${height}`);
  if (!(pixelSizeXDeg > 0) || !(pixelSizeYDeg > 0) || pixelSizeXDeg > 360 || pixelSizeYDeg > 180) {
    throw new RangeError(`cell size must be positive degrees, got ${pixelSizeXDeg} × ${pixelSizeYDeg}°`);
  }
  const southEdge = originLat - height * pixelSizeYDeg;
  if (!(originLat <= 90 + 1e-9) || !(southEdge >= -90 - 1e-9)) {
    throw new RangeError(`rows span latitudes ${southEdge}° to ${originLat}°, outside −90°…90°`);
  }
  const dx = new Float64Array(height);
  const dy = new Float64Array(height);
  const area = new Float64Array(height);
  const dLambda = pixelSizeXDeg * DEG;
  const halfA2 = (WGS84_A * WGS84_A) / 2;
  for (let r = 0; r < height; r++) {
    const north = Math.min(90, originLat - r * pixelSizeYDeg) * DEG;
    const south = Math.max(-90, originLat - (r + 1) * pixelSizeYDeg) * DEG;
    const centre = (north + south) / 2;
    dx[r] = primeVerticalRadius(centre) * Math.cos(centre) * dLambda;
    dy[r] = ((north - south) / 6) * (meridionalRadius(north) + 4 * meridionalRadius(centre) + meridionalRadius(south));
    area[r] = halfA2 * dLambda * (authalicQ(Math.sin(north)) - authalicQ(Math.sin(south)));
  }
  return { dx, dy, area, geographic: true };
}
