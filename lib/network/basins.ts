// Drainage basins of a D8 flow grid (O'Callaghan & Mark 1984, CVGIP 28(3):323–344): every cell belongs to the
// outlet its flow path reaches; outlets are the network's own, the N largest, or points snapped to the
// cell of highest contributing area within a radius (common practice).
import type { Grid } from "@/lib/raster/grid";
import type { CellGeometry } from "@/lib/raster/cell-geometry";
import { D8_DX, D8_DY, NO_FLOW } from "@/lib/hydro/neighbours";
import { StreamNetwork, topologicalOrder } from "./model";
import type { GridTransform } from "./from-raster";

/** Label of cells that reach none of the chosen outlets (and of nodata). */
export const NO_BASIN = 0;

/**
 * Basin label of every cell: i + 1 for cells whose flow reaches `outletCells[i]`, NO_BASIN otherwise.
 * Each cell's path is walked until it meets a labelled cell and then labelled on a second walk, so
 * every cell is labelled once and the only memory is the label grid itself.
 */
export function basinLabels(directions: Grid<Uint8Array>, outletCells: ArrayLike<number>, signal?: AbortSignal): Int32Array {
  const { data: dir, width: w, height: h } = directions;
  const n = w * h;
  const UNKNOWN = -1;
  const label = new Int32Array(n).fill(UNKNOWN);
  for (let i = 0; i < outletCells.length; i++) {
    const c = outletCells[i];
    if (!(c >= 0 && c < n)) throw new RangeError(`outlet cell ${c} is outside the ${w}×${h} grid`);
    label[c] = i + 1;
  }
  const downstreamOf = (c: number): number => {
    const k = dir[c];
    if (k === NO_FLOW) return -1;
    const x = (c % w) + D8_DX[k], y = Math.floor(c / w) + D8_DY[k];
    return x < 0 || y < 0 || x >= w || y >= h ? -1 : y * w + x;
  };
  for (let start = 0; start < n; start++) {
    if (label[start] !== UNKNOWN) continue;
    if ((start & 0xfffff) === 0) signal?.throwIfAborted();
    let c = start, found = NO_BASIN;
    for (let guard = 0; guard < n; guard++) {
      const d = downstreamOf(c);
      if (d < 0) break;
      if (label[d] !== UNKNOWN) { found = label[d]; break; }
      c = d;
    }
    for (let c2 = start, guard = 0; guard < n && c2 >= 0 && label[c2] === UNKNOWN; guard++) {
      label[c2] = found;
      c2 = downstreamOf(c2);
    }
  }
  return label;
}

/**
 * The cell of highest contributing area within `radiusM` of the point (x, y) in CRS units — where a
 * gauge or a mapped outlet sits next to, not on, the extracted channel. Distances use the cell
 * geometry of the point's row, which is exact on projected grids and good to the cell size's
 * curvature on geographic ones.
 */
export function snapOutlet(areaM2: ArrayLike<number>, width: number, height: number, transform: GridTransform,
  cellGeometry: CellGeometry, x: number, y: number, radiusM: number): number {
  if (!(radiusM >= 0)) throw new RangeError(`snap radius must be ≥ 0 m, got ${radiusM}`);
  const col = Math.floor((x - transform.originX) / transform.pixelSizeX);
  const row = Math.floor((transform.originY - y) / transform.pixelSizeY);
  if (col < 0 || row < 0 || col >= width || row >= height) {
    throw new RangeError(`outlet (${x}, ${y}) lies outside the grid`);
  }
  const dx = cellGeometry.dx[row], dy = cellGeometry.dy[row];
  const rx = Math.floor(radiusM / dx), ry = Math.floor(radiusM / dy);
  let best = row * width + col, bestArea = -Infinity;
  for (let r = Math.max(0, row - ry); r <= Math.min(height - 1, row + ry); r++) {
    for (let c = Math.max(0, col - rx); c <= Math.min(width - 1, col + rx); c++) {
      if (Math.hypot((c - col) * dx, (r - row) * dy) > radiusM) continue;
      const a = areaM2[r * width + c];
      if (a > bestArea) { bestArea = a; best = r * width + c; }
    }
  }
  return best;
}

/** Outlet links of the network, largest contributing area first (ties by link id). */
export function outletLinksBySize(network: StreamNetwork): number[] {
  return network.links
    .filter((l) => l.downstream < 0)
    .sort((a, b) => (b.areaM2 - a.areaM2) || (a.id - b.id))
    .map((l) => l.id);
}

/** The links draining to the given outlet links, renumbered from 0 in their original order, with
 *  `originalId` mapping back. */
export function subNetwork(network: StreamNetwork, outletLinks: number[]): { network: StreamNetwork; originalId: Int32Array } {
  const n = network.links.length;
  const keep = new Uint8Array(n);
  for (const o of outletLinks) {
    if (!(o >= 0 && o < n) || network.links[o].downstream >= 0) throw new RangeError(`link ${o} is not an outlet`);
    keep[o] = 1;
  }
  const order = topologicalOrder(network);
  for (let t = n - 1; t >= 0; t--) { // outlets first: each link inherits its downstream link's choice
    const i = order[t], d = network.links[i].downstream;
    if (d >= 0) keep[i] = keep[d];
  }
  const newId = new Int32Array(n).fill(-1);
  const originalId: number[] = [];
  for (let i = 0; i < n; i++) if (keep[i]) { newId[i] = originalId.length; originalId.push(i); }
  const links = originalId.map((i, id) => {
    const l = network.links[i];
    return { ...l, id, downstream: l.downstream < 0 ? -1 : newId[l.downstream] };
  });
  return { network: { links, crs: network.crs }, originalId: Int32Array.from(originalId) };
}
