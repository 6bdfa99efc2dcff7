// Middle-thirds Cantor set (Cantor 1883, Math. Ann. 21): at level k, 2^k intervals of 3^−k;
// boxes of side 3^j cells meet exactly 2^(k−j) of them; D = ln 2 / ln 3 (derived).
import { makeGrid, type Grid } from "@/lib/raster/grid";

/** A one-row mask of 3^k cells; a cell is set when its base-3 digits hold no 1. */
export function cantorSet(k: number): Grid<Uint8Array> {
  if (!Number.isInteger(k) || k < 0 || k > 15) throw new RangeError(`k must be an integer in [0, 15], got ${k}`);
  const n = 3 ** k;
  const mask = new Uint8Array(n);
  for (let i = 0; i < n; i++) {
    let v = i, inSet = 1;
    for (let d = 0; d < k; d++, v = Math.floor(v / 3)) if (v % 3 === 1) { inSet = 0; break; }
    mask[i] = inSet;
  }
  return makeGrid(mask, n, 1);
}
