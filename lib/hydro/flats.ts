// Barnes, Lehman & Mulla (2014), Computers & Geosciences 62:128–135: flat resolution by a gradient away from higher terrain combined with one towards lower terrain, O(N) breadth-first.
import type { Grid } from "@/lib/raster/grid";
import { D8_DX, D8_DY } from "@/lib/hydro/neighbours";
import { ABORT_CHECK_ROWS } from "@/lib/hydro/cancellation";

export interface FlatResolution {
  /** per cell: 0 off flats and on unresolved flats; on a resolved flat a positive value that falls
   *  towards its outlets, which D8 follows where elevations are level (elevations are not changed) */
  increments: Int32Array;
  /** cells with no lower neighbour that are neither on the grid edge nor next to nodata */
  flatCells: number;
  /** flats (8-connected groups of flat cells; adjacent flat cells always share one elevation) */
  flats: number;
  /** flats with no cell of equal elevation that drains, so no way out: left with increments 0 */
  unresolvedFlats: number;
  /** cells of the unresolved flats */
  unresolvedCells: number;
  /** largest increment, for the evidence: at most 2 × the longest way to an outlet + the longest way
   *  from higher terrain, both in cell steps */
  maxIncrement: number;
}

/**
 * Finds the flats of `dem` (after depression filling without epsilon) and builds increments that route
 * each flat to its outlets: 2·(steps to the nearest draining cell of equal elevation) + (largest steps
 * from higher terrain on this flat − steps from higher terrain). Along a shortest path to an outlet the
 * first term falls by 2 per step while the second rises by at most 1, so every cell of a resolved flat
 * has a neighbour with a smaller increment (Barnes et al. 2014, §2).
 */
export function resolveFlats(dem: Grid<Float32Array>, options: { signal?: AbortSignal } = {}): FlatResolution {
  const { data: z, width: w, height: h } = dem;
  if (z.length !== w * h) {
    throw new RangeError(`grid data has ${z.length} cells, expected ${w}×${h} = ${w * h}`);
  }
  const signal = options.signal;
  signal?.throwIfAborted();
  const n = w * h;
  const increments = new Int32Array(n);
  const offsets = new Int32Array(8);
  for (let k = 0; k < 8; k++) offsets[k] = D8_DY[k] * w + D8_DX[k];

  // 1. Flat cells: interior, valid, every neighbour valid and not lower (NaN fails `>=`). Edge cells
  //    and cells next to nodata are never flat: with no lower neighbour they are outlets.
  //    label: 0 off flats, −1 flat and not yet labelled, then the flat's number 1, 2, …
  const label = new Int32Array(n);
  let flatCells = 0;
  for (let y = 1; y < h - 1; y++) {
    if (y % ABORT_CHECK_ROWS === 0) signal?.throwIfAborted();
    for (let i = y * w + 1, end = y * w + w - 1; i < end; i++) {
      const zc = z[i];
      if (zc !== zc) continue;
      let flat = true;
      for (let k = 0; k < 8; k++) {
        if (!(z[i + offsets[k]] >= zc)) {
          flat = false;
          break;
        }
      }
      if (flat) {
        label[i] = -1;
        flatCells++;
      }
    }
  }
  const result = { increments, flatCells, flats: 0, unresolvedFlats: 0, unresolvedCells: 0, maxIncrement: 0 };
  if (flatCells === 0) return result;

  // 2. Number the flats by breadth-first search (`members` is the queue). Flat cells are interior, so
  //    their eight offsets never leave the grid; a flat neighbour always has the cell's elevation, so
  //    only off-flat neighbours tell apart the edges: higher ones make a high edge (step 1 from higher
  //    terrain, kept in `increments` for now), equal ones a way out (step 1 towards lower terrain,
  //    collected in `queue`).
  const members = new Int32Array(flatCells);
  const queue = new Int32Array(flatCells);
  let filled = 0;
  let flats = 0;
  let outletSide = 0;
  for (let i = 0; i < n; i++) {
    if (label[i] !== -1) continue;
    label[i] = ++flats;
    members[filled++] = i;
    for (let head = filled - 1; head < filled; head++) {
      const c = members[head], zc = z[c];
      let higher = false, way = false;
      for (let k = 0; k < 8; k++) {
        const j = c + offsets[k];
        const lj = label[j];
        if (lj === -1) {
          label[j] = flats;
          members[filled++] = j;
        } else if (lj === 0) {
          if (z[j] > zc) higher = true;
          else way = true; // not lower, or c would not be flat
        }
      }
      if (higher) increments[c] = 1;
      if (way) queue[outletSide++] = c;
    }
  }
  signal?.throwIfAborted();

  // 3. Steps from higher terrain, breadth-first from the high edges (moved to the front of `members`,
  //    which becomes the queue); the largest per flat in `maxAway`. A flat without higher neighbours
  //    keeps 0 throughout.
  const maxAway = new Int32Array(flats + 1);
  let tail = 0;
  for (let m = 0; m < flatCells; m++) if (increments[members[m]] === 1) members[tail++] = members[m];
  for (let head = 0; head < tail; head++) {
    const c = members[head], away = increments[c], flat = label[c];
    if (away > maxAway[flat]) maxAway[flat] = away;
    for (let k = 0; k < 8; k++) {
      const j = c + offsets[k];
      if (increments[j] === 0 && label[j] > 0) {
        increments[j] = away + 1;
        members[tail++] = j;
      }
    }
  }
  signal?.throwIfAborted();

  // 4. Steps towards lower terrain, level by level from the cells beside a way out; a visited cell's
  //    label turns negative. The final increment replaces the away-steps in place.
  for (let m = 0; m < outletSide; m++) label[queue[m]] = -label[queue[m]];
  tail = outletSide;
  let maxIncrement = 0;
  for (let head = 0, step = 1; head < tail; step++) {
    const levelEnd = tail;
    for (; head < levelEnd; head++) {
      const c = queue[head];
      const away = increments[c];
      const inc = 2 * step + (away === 0 ? 0 : maxAway[-label[c]] - away);
      increments[c] = inc;
      if (inc > maxIncrement) maxIncrement = inc;
      for (let k = 0; k < 8; k++) {
        const j = c + offsets[k];
        if (label[j] > 0) {
          label[j] = -label[j];
          queue[tail++] = j;
        }
      }
    }
  }

  // 5. Flats the search never reached have no way out: clear their away-steps and count them.
  let unresolvedCells = 0;
  let unresolvedFlats = 0;
  const counted = new Uint8Array(flats + 1);
  for (let i = 0; i < n; i++) {
    const l = label[i];
    if (l <= 0) continue;
    increments[i] = 0;
    unresolvedCells++;
    if (counted[l] === 0) {
      counted[l] = 1;
      unresolvedFlats++;
    }
  }
  return { ...result, flats, unresolvedFlats, unresolvedCells, maxIncrement };
}
