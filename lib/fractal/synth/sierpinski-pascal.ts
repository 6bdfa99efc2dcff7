// Sierpinski triangle as Pascal's triangle mod 2 (e.g. Peitgen, Jürgens & Saupe 1992, Chaos and Fractals, Springer):
// on 2^k rows, boxes of side 2^j meet exactly 3^(k−j) of it; D = ln 3 / ln 2 (derived).
import { makeGrid, type Grid } from "@/lib/raster/grid";

/** A 2^k × 2^k mask: row n, column m is C(n, m) mod 2, built by the additive rule C(n,m) = C(n−1,m−1) + C(n−1,m). */
export function sierpinskiPascal(k: number): Grid<Uint8Array> {
  if (!Number.isInteger(k) || k < 0 || k > 13) throw new RangeError(`k must be an integer in [0, 13], got ${k}`);
  const n = 2 ** k;
  const mask = new Uint8Array(n * n);
  mask[0] = 1;
  for (let r = 1; r < n; r++) {
    const o = r * n, p = o - n;
    mask[o] = 1;
    for (let m = 1; m <= r; m++) mask[o + m] = mask[p + m - 1] ^ mask[p + m];
  }
  return makeGrid(mask, n, n);
}
