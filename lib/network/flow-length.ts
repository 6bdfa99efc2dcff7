// Longest flow path to the divide: the main-stream length of Hack (1957), USGS Prof. Paper 294-B, "measured
// from the divide", computed on a D8 grid (O'Callaghan & Mark 1984) in one pass in topological order.
import type { Grid } from "@/lib/raster/grid";
import type { CellGeometry } from "@/lib/raster/cell-geometry";
import { D8_DX, D8_DY, NO_FLOW } from "@/lib/hydro/neighbours";
import { d8StepTable } from "./step-table";

/** Cells between two looks at the abort signal. */
const ABORT_CHECK_CELLS = 1 << 20;

/**
 * Length of the longest flow path from any divide cell down to each cell, m (0 on a cell nothing
 * drains into). `order` lists the valid cells with every cell after all cells that drain into it
 * (flowAccumulation's order). Float32: 4 bytes a cell, and 7 digits are centimetres on a 100 km path.
 */
export function longestFlowPath(directions: Grid<Uint8Array>, order: Int32Array, cellGeometry: CellGeometry, signal?: AbortSignal): Float32Array {
  const { data: dir, width: w, height: h } = directions;
  if (cellGeometry.dx.length !== h) throw new RangeError(`cell geometry has ${cellGeometry.dx.length} rows, the grid has ${h}`);
  const length = new Float32Array(w * h);
  const steps = d8StepTable(cellGeometry);
  const offsets = new Int32Array(8);
  for (let k = 0; k < 8; k++) offsets[k] = D8_DY[k] * w + D8_DX[k];
  for (let t = 0; t < order.length; t++) {
    if ((t & (ABORT_CHECK_CELLS - 1)) === 0) signal?.throwIfAborted();
    const c = order[t], k = dir[c];
    if (k === NO_FLOW) continue;
    const d = c + offsets[k], reach = length[c] + steps[8 * ((c / w) | 0) + k];
    if (reach > length[d]) length[d] = reach;
  }
  return length;
}
