// O'Callaghan & Mark (1984), Computer Vision, Graphics, and Image Processing 28(3):323–344: D8 flow directions, steepest drop over the true distance to each of the eight neighbours.
import type { Grid } from "@/lib/raster/grid";
import type { CellGeometry } from "@/lib/raster/cell-geometry";
import { ABORT_CHECK_ROWS } from "@/lib/hydro/cancellation";

export interface D8Options {
  /** flat increments from `resolveFlats`: where a cell has no lower neighbour, it drains to the
   *  neighbour of equal elevation down which the increment falls most steeply */
  flatIncrements?: Int32Array;
  /** a zeroed array of one byte a cell in which each cell's donors (the cells that drain into it, at
   *  most 8) are counted as the directions are set, for `flowAccumulation`'s `donors` option: that
   *  spares the accumulation a pass over the grid */
  donors?: Uint8Array;
  /** checked every few hundred rows; an aborted signal throws its reason */
  signal?: AbortSignal;
}

/**
 * Centre-to-centre step lengths in metres from a cell of row `y` to its neighbour in each direction
 * 0–7 (E, SE, S, SW, W, NW, N, NE), written into `out`.
 *
 * E/W: dx of the row. N/S: half the height of each of the two rows (the meridian arc between the
 * centres; exact for any per-row geometry). Diagonals: √(dx̄² + dy²) with dx̄ the mean width of the two
 * rows, i.e. the width at their shared boundary to first order; on geographic grids this planar step
 * differs from the geodesic by a relative O(Δφ²) (under 1e-10 on 1″ and 3″ rows up to 70°, against
 * geographiclib in the tests), far below the drop differences D8 compares. On a
 * projected grid every value is exact. At the first and last row the missing neighbour row is taken
 * to be like the row itself (no cell is ever entered there).
 */
export function d8StepLengths(geometry: CellGeometry, y: number, out: Float64Array = new Float64Array(8)): Float64Array {
  const { dx, dy } = geometry;
  const last = dx.length - 1;
  const north = y > 0 ? y - 1 : y, south = y < last ? y + 1 : y;
  const stepN = (dy[north] + dy[y]) / 2, stepS = (dy[y] + dy[south]) / 2;
  const diagN = Math.hypot((dx[north] + dx[y]) / 2, stepN);
  const diagS = Math.hypot((dx[y] + dx[south]) / 2, stepS);
  out[0] = dx[y];
  out[1] = diagS;
  out[2] = stepS;
  out[3] = diagS;
  out[4] = dx[y];
  out[5] = diagN;
  out[6] = stepN;
  out[7] = diagN;
  return out;
}

/** 1 / d8StepLengths of every row, 8 values a row: what the D8 kernels read (a flat array, which a
 *  helper thread can share). */
export function d8InverseSteps(geometry: CellGeometry): Float64Array {
  const h = geometry.dx.length;
  const inv = new Float64Array(8 * h);
  const step = new Float64Array(8);
  for (let y = 0; y < h; y++) {
    d8StepLengths(geometry, y, step);
    for (let k = 0; k < 8; k++) inv[8 * y + k] = 1 / step[k];
  }
  return inv;
}

/**
 * D8 flow direction of every cell: the code 0–7 of the neighbour with the largest drop/distance
 * (ties go to the lowest code), or NO_FLOW for nodata, for cells with no lower neighbour on the edge or
 * next to nodata (outlets), and for unresolved flats and pits. Only valid neighbours are considered.
 */
export function d8Directions(dem: Grid<Float32Array>, geometry: CellGeometry, options: D8Options = {}): Grid<Uint8Array> {
  const { data: z, width: w, height: h } = dem;
  if (z.length !== w * h) {
    throw new RangeError(`grid data has ${z.length} cells, expected ${w}×${h} = ${w * h}`);
  }
  if (geometry.dx.length !== h || geometry.dy.length !== h) {
    throw new RangeError(`cell geometry has ${geometry.dx.length} rows, the grid has ${h}`);
  }
  const inc = options.flatIncrements;
  if (inc !== undefined && inc.length !== w * h) {
    throw new RangeError(`flat increments have ${inc.length} cells, the grid has ${w * h}`);
  }
  const donors = options.donors ?? null;
  if (donors !== null && donors.length !== w * h) {
    throw new RangeError(`donor counts have ${donors.length} cells, the grid has ${w * h}`);
  }
  const signal = options.signal;
  const dir = new Uint8Array(w * h);
  const inv = d8InverseSteps(geometry);
  for (let y = 0; y < h; y += ABORT_CHECK_ROWS) {
    signal?.throwIfAborted();
    steepestDescentRows(z, w, h, inv, dir, donors, y, Math.min(h, y + ABORT_CHECK_ROWS));
  }
  if (inc !== undefined) flatDescent(dem, inv, inc, dir, donors, signal);
  return { data: dir, width: w, height: h };
}

/** flatDescentRows over rows y0 … y1 − 1 (default: the whole grid), looking at the signal every
 *  ABORT_CHECK_ROWS rows: the second half of d8Directions, once steepestDescentRows has set `dir` (and
 *  counted into `donors`). */
export function flatDescent(
  dem: Grid<Float32Array>, inv: Float64Array, inc: Int32Array, dir: Uint8Array, donors: Uint8Array | null, signal?: AbortSignal,
  y0 = 0, y1 = dem.height,
): void {
  const { data: z, width: w, height: h } = dem;
  for (let y = y0; y < y1; y += ABORT_CHECK_ROWS) {
    signal?.throwIfAborted();
    flatDescentRows(z, w, h, inv, inc, dir, donors, y, Math.min(y1, y + ABORT_CHECK_ROWS));
  }
}

// The two kernels below are self-contained (no imports, no inner functions, constants inline): the
// helper thread (lib/hydro/helper-thread.ts) runs their source text as it is.

/**
 * D8 over rows y0 … y1 − 1 from the elevations alone: cells with no lower neighbour get NO_FLOW (255,
 * lib/hydro/neighbours.ts), and with `donors` each direction set counts one donor of the cell it
 * enters. `inv` is d8InverseSteps. Only valid neighbours are considered; NaN neighbours give NaN
 * slopes, which never compare greater.
 */
export function steepestDescentRows(
  z: Float32Array, w: number, h: number, inv: Float64Array, dir: Uint8Array, donors: Uint8Array | null, y0: number, y1: number,
): void {
  const noFlow = 255;
  const dx = [1, 1, 0, -1, -1, -1, 0, 1], dy = [0, 1, 1, 1, 0, -1, -1, -1];
  const offsets = new Int32Array(8);
  for (let k = 0; k < 8; k++) offsets[k] = dy[k] * w + dx[k];
  for (let y = y0; y < y1; y++) {
    const row = y * w, r = 8 * y;
    // Cells on the grid edge, where some neighbours do not exist: every cell of the first and last
    // row, the first and last of the others. With no lower neighbour they are outlets.
    const edgeRow = y === 0 || y === h - 1 || w < 3;
    for (let x = 0; x < w; x = edgeRow || x === w - 1 ? x + 1 : w - 1) {
      const i = row + x, zc = z[i];
      let best = 0, code = noFlow;
      if (zc === zc) {
        for (let k = 0; k < 8; k++) {
          const nx = x + dx[k], ny = y + dy[k];
          if (nx < 0 || ny < 0 || nx >= w || ny >= h) continue;
          const v = (zc - z[ny * w + nx]) * inv[r + k];
          if (v > best) { best = v; code = k; }
        }
      }
      dir[i] = code;
    }
    if (!edgeRow) {
      // Interior: all eight neighbours exist. A 3×3 window slides along the row, so each elevation is
      // loaded once per row, not eight times.
      const i0 = inv[r], i1 = inv[r + 1], i2 = inv[r + 2], i3 = inv[r + 3], i4 = inv[r + 4], i5 = inv[r + 5], i6 = inv[r + 6], i7 = inv[r + 7];
      const north = row - w, south = row + w;
      let nw = z[north], n = z[north + 1], cw = z[row], c = z[row + 1], sw = z[south], s = z[south + 1];
      for (let x = 1; x < w - 1; x++) {
        const ne = z[north + x + 1], ce = z[row + x + 1], se = z[south + x + 1];
        let best = 0, code = noFlow, v: number;
        if ((v = (c - ce) * i0) > best) { best = v; code = 0; }
        if ((v = (c - se) * i1) > best) { best = v; code = 1; }
        if ((v = (c - s) * i2) > best) { best = v; code = 2; }
        if ((v = (c - sw) * i3) > best) { best = v; code = 3; }
        if ((v = (c - cw) * i4) > best) { best = v; code = 4; }
        if ((v = (c - nw) * i5) > best) { best = v; code = 5; }
        if ((v = (c - n) * i6) > best) { best = v; code = 6; }
        if ((v = (c - ne) * i7) > best) { best = v; code = 7; } // a NaN c compares false throughout
        dir[row + x] = code;
        nw = n; n = ne; cw = c; c = ce; sw = s; s = se;
      }
    }
    if (donors !== null) {
      for (let i = row; i < row + w; i++) {
        const d = dir[i];
        if (d !== noFlow) donors[i + offsets[d]]++;
      }
    }
  }
}

/**
 * The flat cells of rows y0 … y1 − 1 (NO_FLOW from steepestDescentRows, increment > 0): each drains
 * to the neighbour of equal elevation down which the increment falls most steeply, counted as its
 * donor with `donors`. Flat cells are interior, so all eight neighbours exist.
 */
export function flatDescentRows(
  z: Float32Array, w: number, h: number, inv: Float64Array, inc: Int32Array, dir: Uint8Array, donors: Uint8Array | null, y0: number, y1: number,
): void {
  const noFlow = 255;
  for (let y = Math.max(y0, 1); y < Math.min(y1, h - 1); y++) {
    const r = 8 * y;
    const i0 = inv[r], i1 = inv[r + 1], i2 = inv[r + 2], i3 = inv[r + 3], i4 = inv[r + 4], i5 = inv[r + 5], i6 = inv[r + 6], i7 = inv[r + 7];
    for (let i = y * w + 1; i < y * w + w - 1; i++) {
      const ic = inc[i];
      if (ic <= 0 || dir[i] !== noFlow) continue;
      const c = z[i];
      let best = 0, code = noFlow, v: number, t = i;
      if (z[i + 1] === c && (v = (ic - inc[i + 1]) * i0) > best) { best = v; code = 0; t = i + 1; }
      if (z[i + w + 1] === c && (v = (ic - inc[i + w + 1]) * i1) > best) { best = v; code = 1; t = i + w + 1; }
      if (z[i + w] === c && (v = (ic - inc[i + w]) * i2) > best) { best = v; code = 2; t = i + w; }
      if (z[i + w - 1] === c && (v = (ic - inc[i + w - 1]) * i3) > best) { best = v; code = 3; t = i + w - 1; }
      if (z[i - 1] === c && (v = (ic - inc[i - 1]) * i4) > best) { best = v; code = 4; t = i - 1; }
      if (z[i - w - 1] === c && (v = (ic - inc[i - w - 1]) * i5) > best) { best = v; code = 5; t = i - w - 1; }
      if (z[i - w] === c && (v = (ic - inc[i - w]) * i6) > best) { best = v; code = 6; t = i - w; }
      if (z[i - w + 1] === c && (v = (ic - inc[i - w + 1]) * i7) > best) { best = v; code = 7; t = i - w + 1; }
      dir[i] = code;
      if (code !== noFlow && donors !== null) donors[t]++;
    }
  }
}
