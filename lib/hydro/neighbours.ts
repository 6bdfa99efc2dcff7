// The D8 neighbour table (O'Callaghan & Mark 1984): direction codes 0–7 clockwise from east on a
// north-up grid whose rows run south (y grows downwards). One table for every module that walks flow.

/** column offset of direction k: E, SE, S, SW, W, NW, N, NE */
export const D8_DX = Int8Array.of(1, 1, 0, -1, -1, -1, 0, 1);
/** row offset of direction k (positive is south) */
export const D8_DY = Int8Array.of(0, 1, 1, 1, 0, -1, -1, -1);
/** code of a cell that sends its water nowhere: an outlet at the grid edge or next to nodata, an
 *  unresolved flat or pit, or a nodata cell */
export const NO_FLOW = 255;
/** true for the diagonal directions (odd codes) */
export function isDiagonal(k: number): boolean {
  return (k & 1) === 1;
}
/** the direction that points back: (k + 4) mod 8 */
export function opposite(k: number): number {
  return (k + 4) & 7;
}
