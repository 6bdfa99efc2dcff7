// Flow accumulation over D8 directions (O'Callaghan & Mark 1984) in one topological pass: cells leave a queue once all their donors have (Kahn 1962, Communications of the ACM 5(11):558–562).
import type { Grid } from "@/lib/raster/grid";
import type { CellGeometry } from "@/lib/raster/cell-geometry";
import { D8_DX, D8_DY, NO_FLOW } from "@/lib/hydro/neighbours";
import { ABORT_CHECK_CELLS, ABORT_CHECK_ROWS } from "@/lib/hydro/cancellation";

/** Donor count of a cell already appended to the order (a real count is at most 8). */
const DONE = 255;

export interface FlowAccumulation {
  /** contributing cells of each cell, itself included; 0 on nodata. Uint32: exact to 4.29·10⁹ cells,
   *  where Float32 stops counting exactly past 2²⁴ ≈ 1.7·10⁷ (a 4096² grid) */
  cells: Uint32Array;
  /** contributing area of each cell, itself included, m²; 0 on nodata. Float64: a Float32 sum of
   *  900 m² cells stops growing near 1.5·10¹⁰ m² (its step there is 1024 m²), well inside one 4096² DEM */
  areaM2: Float64Array;
  /** the valid cells, every one after all the cells that drain into it (sources first); walking it
   *  backwards visits each outlet before its basin */
  order: Int32Array;
  /** valid cells that drain nowhere (NO_FLOW): outlets, and pits or flats left unresolved */
  outlets: number;
  /** cells that hold an elevation */
  validCells: number;
}

/**
 * Accumulates cells and cell-area-weighted contributing area down the D8 directions. `dem` tells
 * valid cells from nodata; `geometry` gives the area of each row's cells. Throws a RangeError when a
 * direction leaves the grid, enters nodata or is not a D8 code, and when directions form a cycle.
 */
export function flowAccumulation(
  directions: Grid<Uint8Array>,
  dem: Grid<Float32Array>,
  geometry: CellGeometry,
  options: {
    signal?: AbortSignal;
    /** donor counts of these very directions, from d8Directions' `donors` option: the counting pass is
     *  skipped, and with it the checks of each direction (D8 makes none that leave the grid or enter
     *  nodata); the cycle check stays. Consumed: it ends with every valid cell at 255. */
    donors?: Uint8Array;
    /** two arrays of one Int32 a cell to use instead of new ones (conditionAndRoute's `spare`, whose
     *  pages are mapped already), for the cell counts (as Uint32) and the order; contents do not matter */
    reuse?: [Int32Array, Int32Array];
    /** called every ABORT_CHECK_CELLS cells of the walk with the share of the valid cells ordered (0–1) */
    onProgress?(fraction: number): void;
  } = {},
): FlowAccumulation {
  const { width: w, height: h } = directions;
  const dir = directions.data;
  const z = dem.data;
  if (dem.width !== w || dem.height !== h || dir.length !== w * h || z.length !== w * h) {
    throw new RangeError(`directions (${w}×${h}) and DEM (${dem.width}×${dem.height}) must have one size`);
  }
  if (geometry.area.length !== h) {
    throw new RangeError(`cell geometry has ${geometry.area.length} rows, the grid has ${h}`);
  }
  if (options.donors !== undefined && options.donors.length !== w * h) {
    throw new RangeError(`donor counts have ${options.donors.length} cells, the grid has ${w * h}`);
  }
  const signal = options.signal;
  const n = w * h;
  const offsets = new Int32Array(8);
  for (let k = 0; k < 8; k++) offsets[k] = D8_DY[k] * w + D8_DX[k];

  // Each cell counts itself when it joins the order (its donors have all been added by then), so the
  // cell counts start at 0 and need no pass of their own.
  const reuse = options.reuse;
  if (reuse !== undefined && (reuse[0].length !== n || reuse[1].length !== n)) {
    throw new RangeError(`the arrays to reuse have ${reuse[0].length} and ${reuse[1].length} cells, the grid has ${n}`);
  }
  if (reuse !== undefined && reuse[0].buffer === reuse[1].buffer) throw new RangeError("the two arrays to reuse share one buffer");
  const cells = reuse ? new Uint32Array(reuse[0].buffer, reuse[0].byteOffset, n).fill(0) : new Uint32Array(n);
  const areaM2 = new Float64Array(n);
  // On a projected grid every cell has one area: accumulate counts only and write the areas after the
  // walk in one sequential pass (one rounding instead of one per addition, and the walk's scattered
  // writes touch the 4-byte counts alone). Otherwise each valid cell starts with its own area, added to
  // before it joins.
  const uniformArea = geometry.area.every((a) => a === geometry.area[0]);
  const cellArea = h > 0 ? geometry.area[0] : 0;
  // Imported bindings are read once: under CommonJS interop (tsx, bundlers) every read is a getter call.
  const noFlow = NO_FLOW, abortMask = ABORT_CHECK_CELLS - 1;
  let validCells = 0;
  let donors = options.donors;
  if (donors === undefined) {
    // Donor counts (at most 8, so one byte), checking each direction once.
    donors = new Uint8Array(n);
    for (let y = 0; y < h; y++) {
      if (y % ABORT_CHECK_ROWS === 0) signal?.throwIfAborted();
      const interiorRow = y > 0 && y < h - 1;
      for (let x = 0, i = y * w; x < w; x++, i++) {
        const zi = z[i];
        if (zi !== zi) continue; // nodata: the NaN rule of isNodata, inline in this loop
        const d = dir[i];
        if (d === noFlow) continue;
        if (d > 7) throw new RangeError(`cell (${x}, ${y}) has direction code ${d}; D8 codes are 0–7 or ${NO_FLOW}`);
        if (!(interiorRow && x > 0 && x < w - 1)) {
          const nx = x + D8_DX[d], ny = y + D8_DY[d];
          if (nx < 0 || ny < 0 || nx >= w || ny >= h) {
            throw new RangeError(`cell (${x}, ${y}) drains off the grid (direction ${d})`);
          }
        }
        const t = i + offsets[d], zt = z[t];
        if (zt !== zt) throw new RangeError(`cell (${x}, ${y}) drains into nodata (direction ${d})`);
        donors[t]++;
      }
    }
  }
  for (let y = 0; y < h; y++) {
    if (y % ABORT_CHECK_ROWS === 0) signal?.throwIfAborted();
    const rowArea = geometry.area[y];
    for (let i = y * w; i < y * w + w; i++) {
      const zi = z[i];
      if (zi !== zi) continue;
      validCells++;
      if (!uniformArea) areaM2[i] = rowArea;
    }
  }

  // Kahn's order, walked along the flow: scan for sources in row order and follow each one downstream
  // for as long as the cell reached has no donor left to wait for. Each cell is appended to `order`
  // once, after all its donors, and the walks keep memory access local. A passed cell is marked DONE.
  const order = reuse ? reuse[1].subarray(0, validCells) : new Int32Array(validCells);
  let tail = 0, outlets = 0;
  for (let s = 0; s < n; s++) {
    if ((s & abortMask) === 0) {
      signal?.throwIfAborted();
      if (s > 0 && validCells > 0) options.onProgress?.(tail / validCells);
    }
    if (donors[s] !== 0) continue; // waiting for donors, or passed already
    const zs = z[s];
    if (zs !== zs) continue; // nodata
    let c = s;
    for (;;) {
      order[tail++] = c;
      donors[c] = DONE;
      const count = ++cells[c];
      const d = dir[c];
      if (d === noFlow) {
        outlets++;
        break;
      }
      const t = c + offsets[d];
      cells[t] += count;
      if (!uniformArea) areaM2[t] += areaM2[c];
      if (--donors[t] !== 0) break;
      c = t;
    }
  }
  if (tail !== validCells) {
    throw new RangeError(`the directions form a cycle through ${validCells - tail} cells; D8 over a DEM cannot`);
  }
  if (uniformArea) for (let i = 0; i < n; i++) areaM2[i] = cells[i] * cellArea; // 0 on nodata
  return { cells, areaM2, order, outlets, validCells };
}
