// A hand-made 5 × 4 flow grid shared by the from-raster and basins tests (not a test file itself).
import { makeGrid } from "@/lib/raster/grid";
import { projectedCellGeometry } from "@/lib/raster/cell-geometry";
import { NO_FLOW } from "@/lib/hydro/neighbours";

const SE = 1, S = 2, SW = 3, X = NO_FLOW;
/**
 * 10 m cells, origin (1000, 2000). Two sources (1,0) and (3,0) run S then diagonally into (2,2), which
 * runs S to the outlet (2,3). Every other cell drains nowhere. Areas count the cells above (100 m² each).
 *   row 0:  X  S  X  S  X
 *   row 1:  X  SE X  SW X
 *   row 2:  X  X  S  X  X
 *   row 3:  X  X  X* X  X      (* the outlet)
 */
export const Y_GRID = {
  width: 5,
  height: 4,
  directions: makeGrid(Uint8Array.from([X, S, X, S, X, X, SE, X, SW, X, X, X, S, X, X, X, X, X, X, X]), 5, 4),
  areaM2: Float64Array.from([100, 100, 100, 100, 100, 100, 200, 100, 200, 100, 100, 100, 500, 100, 100, 100, 100, 600, 100, 100]),
  elevation: Float32Array.from([9, 9, 9, 9, 9, 9, 8, 9, 7, 9, 9, 9, 5, 9, 9, 9, 9, 4, 9, 9]),
  cellGeometry: projectedCellGeometry(4, 10, 10),
  transform: { originX: 1000, originY: 2000, pixelSizeX: 10, pixelSizeY: 10 },
  crs: "+proj=utm +zone=33 +datum=WGS84 +units=m +no_defs",
};
