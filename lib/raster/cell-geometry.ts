// Cell sizes in metres per row: constant for projected grids; on geographic grids the issue-3 raster
// work adds WGS84 per-row widths, heights and areas (Snyder 1987, USGS PP 1395, eq. 3-12).

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
