// Links from junction to junction (Shreve 1966, J. Geol. 74(1):17–37) of a D8 flow grid (O'Callaghan & Mark
// 1984, CVGIP 28(3):323–344) inside the channel cells, those whose contributing area reaches a threshold.
import type { Grid } from "@/lib/raster/grid";
import type { CellGeometry } from "@/lib/raster/cell-geometry";
import { D8_DX, D8_DY, NO_FLOW } from "@/lib/hydro/neighbours";
import { d8StepTable } from "./step-table";
import { StreamLink, StreamNetwork } from "./model";

/** Grid placement in CRS units: origin = outer corner of the top-left cell; rows go south. */
export interface GridTransform {
  originX: number;
  originY: number;
  pixelSizeX: number;
  pixelSizeY: number;
}

export interface RasterNetworkInput {
  /** D8 codes of lib/hydro/neighbours.ts, NO_FLOW at outlets and nodata */
  directions: Grid<Uint8Array>;
  /** contributing area of every cell including itself, m² */
  areaM2: Float32Array | Float64Array;
  /** a cell is a channel when its contributing area is at least this, m² */
  thresholdM2: number;
  /** elevations the drops are taken from, m. The pipeline passes the depression-filled DEM, so a
   *  drop is never negative: water leaving a filled pit runs over its spill level, not its bottom. */
  elevation: Float32Array;
  cellGeometry: CellGeometry;
  transform: GridTransform;
  /** proj4 definition of the grid's CRS; vertices are cell centres in its units */
  crs: string;
  /** longest flow path from the divide to each cell, m (longestFlowPath); when given, every link
   *  carries it at its area cell as `mainStreamLengthM` */
  flowLengthM?: Float32Array;
  /** channel cells, ascending, where a link must end and a new one start although no tributary joins
   *  (basin outlets chosen by a user); a link ending at one takes the area of that cell */
  breakCells?: Int32Array;
  signal?: AbortSignal;
}

export interface RasterNetwork {
  network: StreamNetwork;
  /** first cell of each link: a source or a junction */
  startCell: Int32Array;
  /** last cell of each link: the junction it enters, or its outlet cell */
  endCell: Int32Array;
}

/** Links between two looks at the abort signal. */
const ABORT_CHECK_LINKS = 4096;

/** Number of channel neighbours that drain into channel cell c. */
function channelInflows(c: number, w: number, h: number, dir: Uint8Array, isChannel: (i: number) => boolean): number {
  const x = c % w, y = (c - x) / w;
  let count = 0;
  for (let k = 0; k < 8; k++) {
    const nx = x + D8_DX[k], ny = y + D8_DY[k];
    if (nx < 0 || ny < 0 || nx >= w || ny >= h) continue;
    const n = ny * w + nx;
    // the neighbour drains into c when its direction is the opposite of k
    if (dir[n] === ((k + 4) & 7) && isChannel(n)) count++;
  }
  return count;
}

/**
 * The stream network of the channel cells. A link starts at every channel cell with no channel inflow
 * (a source) or with two or more (a junction) and follows the flow to the next junction, which it
 * includes as its last vertex, or to an outlet (a channel cell whose flow leaves the grid, enters
 * nodata or stops). Length sums the true step lengths between cell centres (d8StepLengths: exact on
 * projected grids, per-row ellipsoidal widths on geographic grids); drop is elevation at the start
 * minus elevation at the last vertex; area is the contributing area of the last cell before the
 * junction (the link's own basin, without the other inflows), or of the outlet or break cell.
 * Memory: two Int32 entries per link plus the link paths; nothing per cell.
 */
export function networkFromRaster(input: RasterNetworkInput): RasterNetwork {
  const { directions, areaM2, thresholdM2, elevation, cellGeometry, transform, crs, signal } = input;
  const breaks = input.breakCells ?? new Int32Array(0);
  const { data: dir, width: w, height: h } = directions;
  const n = w * h;
  if (areaM2.length !== n || elevation.length !== n) {
    throw new RangeError(`area (${areaM2.length}) and elevation (${elevation.length}) must have ${w}×${h} = ${n} cells`);
  }
  if (cellGeometry.dx.length !== h) throw new RangeError(`cell geometry has ${cellGeometry.dx.length} rows, the grid has ${h}`);
  if (input.flowLengthM && input.flowLengthM.length !== n) throw new RangeError(`flowLengthM has ${input.flowLengthM.length} cells, expected ${n}`);
  if (!(thresholdM2 > 0)) throw new RangeError(`the channel threshold must be a positive area in m², got ${thresholdM2}`);
  const isChannel = (i: number) => areaM2[i] >= thresholdM2;
  const offsets = new Int32Array(8);
  for (let k = 0; k < 8; k++) offsets[k] = D8_DY[k] * w + D8_DX[k];
  /** the channel cell c drains into, or −1 where its water leaves the network */
  const next = (c: number): number => {
    const k = dir[c];
    if (k === NO_FLOW) return -1;
    const x = (c % w) + D8_DX[k], y = Math.floor(c / w) + D8_DY[k];
    if (x < 0 || y < 0 || x >= w || y >= h) return -1;
    const d = c + offsets[k];
    return isChannel(d) ? d : -1;
  };

  for (let i = 1; i < breaks.length; i++) {
    if (!(breaks[i] > breaks[i - 1])) throw new RangeError("breakCells must be ascending without repeats");
  }

  // Pass 1: link starts in row-major order, so the list is sorted and a start is found by bisection.
  // A start is a break only (not a source or junction) when exactly one channel flows into it.
  let starts = new Int32Array(1024), breakOnly = new Uint8Array(1024), count = 0;
  for (let c = 0, b = 0; c < n; c++) {
    while (b < breaks.length && breaks[b] < c) b++;
    if (!isChannel(c)) continue;
    const isBreak = b < breaks.length && breaks[b] === c;
    const inflows = channelInflows(c, w, h, dir, isChannel);
    if (inflows !== 1 || isBreak) {
      if (count === starts.length) {
        const grown = new Int32Array(count * 2); grown.set(starts); starts = grown;
        const grownFlags = new Uint8Array(count * 2); grownFlags.set(breakOnly); breakOnly = grownFlags;
      }
      breakOnly[count] = inflows === 1 ? 1 : 0;
      starts[count++] = c;
    }
  }
  const startCell = starts.slice(0, count);
  const linkAt = (c: number): number => bisect(startCell, c);

  // Pass 2: walk each link down to its end.
  const endCell = new Int32Array(count);
  const links: StreamLink[] = new Array(count);
  const steps = d8StepTable(cellGeometry);
  const { originX, originY, pixelSizeX, pixelSizeY } = transform;
  const vertices: number[] = [];
  for (let id = 0; id < count; id++) {
    if (id % ABORT_CHECK_LINKS === 0) signal?.throwIfAborted();
    let c = startCell[id], lengthM = 0, downstream = -1, areaCell = c;
    vertices.length = 0;
    // a D8 grid from a conditioned DEM has no cycles; the bound only guards against a corrupt one
    for (let guard = 0; guard <= n; guard++) {
      const x = c % w, y = (c - x) / w;
      vertices.push(originX + (x + 0.5) * pixelSizeX, originY - (y + 0.5) * pixelSizeY);
      const d = next(c);
      if (d < 0) { areaCell = c; break; }
      lengthM += steps[8 * y + dir[c]];
      const j = linkAt(d);
      if (j >= 0) {
        areaCell = breakOnly[j] ? d : c;
        downstream = j;
        const dx = d % w, dy = (d - dx) / w;
        vertices.push(originX + (dx + 0.5) * pixelSizeX, originY - (dy + 0.5) * pixelSizeY);
        c = d;
        break;
      }
      c = d;
      if (guard === n) throw new RangeError("the flow directions form a cycle; condition the DEM first");
    }
    endCell[id] = c;
    links[id] = {
      id, downstream,
      path: Float64Array.from(vertices),
      lengthM,
      dropM: elevation[startCell[id]] - elevation[c],
      areaM2: areaM2[areaCell],
      ...(input.flowLengthM ? { mainStreamLengthM: input.flowLengthM[areaCell] } : {}),
    };
  }
  return { network: { links, crs }, startCell, endCell };
}

/** Index of `value` in the ascending array `sorted`, or −1. */
function bisect(sorted: Int32Array, value: number): number {
  let lo = 0, hi = sorted.length - 1;
  while (lo <= hi) {
    const mid = (lo + hi) >> 1, v = sorted[mid];
    if (v === value) return mid;
    if (v < value) lo = mid + 1; else hi = mid - 1;
  }
  return -1;
}

/** Writes `values[link]` into `out` on every cell of each link; a junction cell takes the value of
 *  the link that starts there. Cells off the network are left as they are. */
export function paintLinks(raster: RasterNetwork, directions: Grid<Uint8Array>, values: ArrayLike<number>, out: { [i: number]: number; length: number }): void {
  const { data: dir, width: w } = directions;
  const offsets = new Int32Array(8);
  for (let k = 0; k < 8; k++) offsets[k] = D8_DY[k] * w + D8_DX[k];
  const { startCell, endCell, network } = raster;
  for (let id = 0; id < startCell.length; id++) {
    let c = startCell[id];
    const end = endCell[id], toJunction = network.links[id].downstream >= 0;
    while (c !== end) { out[c] = values[id]; c += offsets[dir[c]]; }
    if (!toJunction) out[c] = values[id];
  }
}
