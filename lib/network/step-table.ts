// D8 centre-to-centre step lengths of every row at once (O'Callaghan & Mark 1984 directions; lengths from
// lib/hydro/d8.ts), for the walks that jump between rows at every step and would otherwise recompute them.
import type { CellGeometry } from "@/lib/raster/cell-geometry";
import { d8StepLengths } from "@/lib/hydro/d8";

/** table[8·y + k] = length in m of the step from a cell of row y in direction k. 64 bytes a row. */
export function d8StepTable(geometry: CellGeometry): Float64Array {
  const h = geometry.dx.length;
  const table = new Float64Array(8 * h);
  for (let y = 0; y < h; y++) d8StepLengths(geometry, y, table.subarray(8 * y, 8 * y + 8));
  return table;
}
