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

// Per-cell state while resolving, in the increments array itself (no label grid): 0 off flats; a flat
// cell holds the bitwise complement (so a negative number) of its steps from higher terrain (1, 2, …)
// or NOT_REACHED, plus the WAY_OUT bit when it touches a draining cell of equal elevation; a finished
// cell holds its increment. The steps towards lower terrain are kept apart (one Int32 a cell), so the
// two searches can run at once.
/** a flat cell no breadth-first search from higher terrain has reached (yet) */
const NOT_REACHED = 0x3fffffff;
/** flag: the cell touches a draining cell of equal elevation, so it is one step from an outlet */
const WAY_OUT = 1 << 30;

export interface FlatOptions {
  /** checked every few hundred rows; an aborted signal throws its reason */
  signal?: AbortSignal;
  /** bit set of interior cells that may be flat (cell j is bit j & 31 of word j >> 5), holding every
   *  flat cell, as `priorityFlood` fills it through its `flatCandidates` option; only these cells are
   *  tested, and a cell outside it counts as off the flats. Without it every interior cell is tested. */
  candidates?: Int32Array;
}

/** The flat cells found by `findFlats`, with the starting cells of the two breadth-first searches. */
export interface FlatSearch {
  width: number;
  /** the cells `findFlats` tested (its candidates, or every interior cell) */
  candidates: Int32Array;
  /** per-cell state (see above): 0 off the flats, negative on them */
  state: Int32Array;
  /** room for every candidate; first the high edges (step 1 from higher terrain), in row order */
  fromHigher: Int32Array;
  highEdges: number;
  /** room for every candidate; first the cells with a way out (step 1 towards lower terrain) */
  towardsLower: Int32Array;
  wayOuts: number;
  flatCells: number;
  flats: number;
}

/**
 * Finds the flats of `dem` (after depression filling without epsilon) and builds increments that route
 * each flat to its outlets: 2·(steps to the nearest draining cell of equal elevation) + (M − steps from
 * higher terrain), with M the largest steps from higher terrain (0 term on a flat without higher
 * terrain). Along a shortest path to an outlet the first term falls by 2 per step while the second
 * rises by at most 1, so every cell of a resolved flat has a neighbour with a smaller increment
 * (Barnes et al. 2014, §2). Barnes et al. take M per flat; one M for all flats shifts each flat's
 * increments by a constant, which keeps every difference D8 compares inside a flat, and spares a
 * label grid.
 *
 * The stages are exported for lib/hydro/condition.ts, which runs the two searches (independent of
 * each other, as each keeps its steps in its own array) on two threads: findFlats, stepsFromHigher
 * and stepsTowardsLower in either order or at once, then finishFlats.
 */
export function resolveFlats(dem: Grid<Float32Array>, options: FlatOptions = {}): FlatResolution {
  const search = findFlats(dem, options);
  const towards = new Int32Array(search.state.length);
  const maxAway = stepsFromHigher(search.state, search.fromHigher, search.highEdges, search.width);
  options.signal?.throwIfAborted();
  const reached = stepsTowardsLower(search.state, towards, search.towardsLower, search.wayOuts, search.width);
  return finishFlats(search, towards, maxAway, reached, options.signal);
}

/**
 * Step 1: the flat cells among the candidates, row by row: interior, valid, every neighbour valid and
 * not lower (NaN fails `>=`); one with a higher neighbour is a high edge, step 1 from higher terrain.
 * Edge cells and cells next to nodata are never flat: with no lower neighbour they are outlets. A flat
 * cell next to a cell of its elevation off the flats has a way out (that cell drains, or it would be
 * flat), step 1 towards lower terrain: a neighbour outside the candidates is off the flats, one tested
 * before is known, and one tested after marks it then. The flats are counted on the way by joining
 * runs of flat cells that touch the runs of the row above. With `shared`, the arrays the searches
 * work on are SharedArrayBuffers, for a helper thread; `state` may be given, zeroed, one Int32 a cell.
 */
export function findFlats(dem: Grid<Float32Array>, options: FlatOptions & { shared?: boolean; state?: Int32Array } = {}): FlatSearch {
  const { data: z, width: w, height: h } = dem;
  if (z.length !== w * h) {
    throw new RangeError(`grid data has ${z.length} cells, expected ${w}×${h} = ${w * h}`);
  }
  const n = w * h;
  const words = (n + 31) >>> 5;
  if (options.candidates !== undefined && options.candidates.length !== words) {
    throw new RangeError(`flat candidates have ${options.candidates.length} words, expected ${words} for ${n} cells`);
  }
  const signal = options.signal;
  signal?.throwIfAborted();
  const candidates = options.candidates ?? interiorCells(w, h);
  const ints = (length: number) => (options.shared ? new Int32Array(new SharedArrayBuffer(4 * length)) : new Int32Array(length));
  if (options.state !== undefined && options.state.length !== n) throw new RangeError(`flat states have ${options.state.length} cells, the grid has ${n}`);
  const state = options.state ?? ints(n);
  const offsets = new Int32Array(8);
  for (let k = 0; k < 8; k++) offsets[k] = D8_DY[k] * w + D8_DX[k];

  const outside = (j: number) => (candidates[j >> 5] & (1 << (j & 31))) === 0;
  const offFlats = (j: number) => outside(j) || state[j] === 0;
  const runs = new FlatRuns(w);
  // Room for every candidate, so the starting cells go into the queues as they are found.
  const room = countBits(candidates);
  const fromHigher = ints(room), towardsLower = ints(room);
  let highEdges = 0, wayOuts = 0;
  let flatCells = 0;
  for (let y = 1; y < h - 1; y++) {
    if (y % ABORT_CHECK_ROWS === 0) signal?.throwIfAborted();
    runs.startRow();
    const row = y * w, first = row + 1, last = row + w - 2;
    for (let wi = first >> 5; wi <= last >> 5; wi++) {
      let word = candidates[wi];
      if (word === 0) continue;
      if (wi === first >> 5) word &= -1 << (first & 31);
      if (wi === last >> 5) word &= -1 >>> (31 - (last & 31));
      while (word !== 0) {
        const low = word & -word;
        word ^= low;
        const i = (wi << 5) + 31 - Math.clz32(low);
        const zc = z[i];
        if (zc !== zc) continue;
        // the eight neighbours written out, as in stepsFromHigher: four after i, then four before it
        const e = z[i + 1], se = z[i + w + 1], s = z[i + w], sw = z[i + w - 1];
        const we = z[i - 1], nw = z[i - w - 1], nn = z[i - w], ne = z[i - w + 1];
        if (e >= zc && se >= zc && s >= zc && sw >= zc && we >= zc && nw >= zc && nn >= zc && ne >= zc) {
          const higher = e > zc || se > zc || s > zc || sw > zc || we > zc || nw > zc || nn > zc || ne > zc;
          // a neighbour of equal elevation off the flats: outside the candidates, or tested before and not flat
          const wayOut = (e === zc && outside(i + 1)) || (se === zc && outside(i + w + 1)) || (s === zc && outside(i + w)) ||
            (sw === zc && outside(i + w - 1)) || (we === zc && offFlats(i - 1)) || (nw === zc && offFlats(i - w - 1)) ||
            (nn === zc && offFlats(i - w)) || (ne === zc && offFlats(i - w + 1));
          state[i] = ~((higher ? 1 : NOT_REACHED) | (wayOut ? WAY_OUT : 0));
          if (higher) fromHigher[highEdges++] = i;
          if (wayOut) towardsLower[wayOuts++] = i;
          flatCells++;
          runs.add(i - row);
        } else {
          // a candidate that is not flat: the flat cells of its elevation tested before it have a way out
          for (let k = 4; k < 8; k++) { // west, north-west, north, north-east: the neighbours before i
            const j = i + offsets[k];
            // (WAY_OUT set in the state is the bit clear in the cell's value, its complement)
            if (state[j] !== 0 && z[j] === zc && (state[j] & WAY_OUT) !== 0) {
              state[j] &= ~WAY_OUT;
              towardsLower[wayOuts++] = j;
            }
          }
        }
      }
    }
    runs.endRow();
  }
  return { width: w, candidates, state, fromHigher, highEdges, towardsLower, wayOuts, flatCells, flats: runs.components() };
}

// The two searches below are self-contained (no imports, no inner functions, constants inline: 0x3fffffff
// is NOT_REACHED and 1 << 30 WAY_OUT): the helper thread (lib/hydro/helper-thread.ts) runs their source
// text as it is. Flat cells are interior, so their eight offsets never leave the grid. Breadth-first
// steps do not depend on the order of the starting cells.

/** Step 2: steps from higher terrain, breadth-first from the `highEdges` cells at the front of
 *  `queue` (room for every flat cell), into the states (the WAY_OUT bit rides along). Returns the
 *  largest number of steps. The eight neighbours are written out one by one: in V8 that runs about
 *  twice as fast as a loop over an offset table (measured on the 4096² benchmark surface). */
export function stepsFromHigher(state: Int32Array, queue: Int32Array, highEdges: number, w: number): number {
  const notReached = 0x3fffffff, wayOut = 1 << 30;
  let maxAway = 0;
  for (let head = 0, tail = highEdges; head < tail; head++) {
    const c = queue[head], away = ~state[c] & ~wayOut;
    if (away > maxAway) maxAway = away;
    const next = away + 1;
    let j: number, v: number; // v: the neighbour's value (−1 off the flats, never NOT_REACHED)
    j = c + 1; v = ~state[j]; if ((v & ~wayOut) === notReached) { state[j] = ~(next | (v & wayOut)); queue[tail++] = j; }
    j = c + w + 1; v = ~state[j]; if ((v & ~wayOut) === notReached) { state[j] = ~(next | (v & wayOut)); queue[tail++] = j; }
    j = c + w; v = ~state[j]; if ((v & ~wayOut) === notReached) { state[j] = ~(next | (v & wayOut)); queue[tail++] = j; }
    j = c + w - 1; v = ~state[j]; if ((v & ~wayOut) === notReached) { state[j] = ~(next | (v & wayOut)); queue[tail++] = j; }
    j = c - 1; v = ~state[j]; if ((v & ~wayOut) === notReached) { state[j] = ~(next | (v & wayOut)); queue[tail++] = j; }
    j = c - w - 1; v = ~state[j]; if ((v & ~wayOut) === notReached) { state[j] = ~(next | (v & wayOut)); queue[tail++] = j; }
    j = c - w; v = ~state[j]; if ((v & ~wayOut) === notReached) { state[j] = ~(next | (v & wayOut)); queue[tail++] = j; }
    j = c - w + 1; v = ~state[j]; if ((v & ~wayOut) === notReached) { state[j] = ~(next | (v & wayOut)); queue[tail++] = j; }
  }
  return maxAway;
}

/** Step 3: steps towards lower terrain, breadth-first from the `wayOuts` cells at the front of `queue`
 *  (room for every flat cell), into `towards` (zeroed; the cells with a way out are step 1), over the
 *  cells whose state is negative (the flats; the states themselves are only read, so step 2 may run at
 *  the same time). Returns the number of cells reached. Neighbours written out as in step 2. */
export function stepsTowardsLower(state: Int32Array, towards: Int32Array, queue: Int32Array, wayOuts: number, w: number): number {
  for (let q = 0; q < wayOuts; q++) towards[queue[q]] = 1;
  let tail = wayOuts;
  for (let head = 0, step = 2; head < tail; step++) {
    const levelEnd = tail;
    for (; head < levelEnd; head++) {
      const c = queue[head];
      let j: number;
      j = c + 1; if (towards[j] === 0 && state[j] < 0) { towards[j] = step; queue[tail++] = j; }
      j = c + w + 1; if (towards[j] === 0 && state[j] < 0) { towards[j] = step; queue[tail++] = j; }
      j = c + w; if (towards[j] === 0 && state[j] < 0) { towards[j] = step; queue[tail++] = j; }
      j = c + w - 1; if (towards[j] === 0 && state[j] < 0) { towards[j] = step; queue[tail++] = j; }
      j = c - 1; if (towards[j] === 0 && state[j] < 0) { towards[j] = step; queue[tail++] = j; }
      j = c - w - 1; if (towards[j] === 0 && state[j] < 0) { towards[j] = step; queue[tail++] = j; }
      j = c - w; if (towards[j] === 0 && state[j] < 0) { towards[j] = step; queue[tail++] = j; }
      j = c - w + 1; if (towards[j] === 0 && state[j] < 0) { towards[j] = step; queue[tail++] = j; }
    }
  }
  return tail;
}

/**
 * Step 4: the increments 2·towards + (M − away) into the states, row by row, once both searches are
 * done (`reached` is what stepsTowardsLower returned). The cells still negative then belong to flats
 * without a way out: they get 0 and their flats are counted by a search over them alone.
 */
export function finishFlats(search: FlatSearch, towards: Int32Array, maxAway: number, reached: number, signal?: AbortSignal): FlatResolution {
  const { candidates, state, flatCells, flats, width: w } = search;
  signal?.throwIfAborted();
  const result = { increments: state, flatCells, flats, unresolvedFlats: 0, unresolvedCells: 0, maxIncrement: 0 };
  if (flatCells === 0) return result;
  const words = candidates.length;
  let maxIncrement = 0;
  for (let wi = 0; wi < words; wi++) {
    let word = candidates[wi];
    while (word !== 0) {
      const low = word & -word;
      word ^= low;
      const i = (wi << 5) + 31 - Math.clz32(low);
      const t = towards[i];
      if (t === 0) continue; // off the flats, or on one without a way out
      const away = ~state[i] & ~WAY_OUT;
      const inc = 2 * t + (away === NOT_REACHED ? 0 : maxAway - away);
      if (inc > maxIncrement) maxIncrement = inc;
      state[i] = inc;
    }
  }
  signal?.throwIfAborted();
  if (reached === flatCells) return { ...result, maxIncrement };
  const offsets = new Int32Array(8);
  for (let k = 0; k < 8; k++) offsets[k] = D8_DY[k] * w + D8_DX[k];
  const queue = search.fromHigher; // step 2 is done with it
  let unresolvedCells = 0;
  let unresolvedFlats = 0;
  for (let wi = 0; wi < words; wi++) {
    let word = candidates[wi];
    while (word !== 0) {
      const low = word & -word;
      word ^= low;
      const i = (wi << 5) + 31 - Math.clz32(low);
      if (state[i] < 0) {
        unresolvedFlats++;
        state[i] = 0;
        queue[0] = i;
        for (let head = 0, end = 1; head < end; head++) {
          const c = queue[head];
          unresolvedCells++;
          for (let k = 0; k < 8; k++) {
            const j = c + offsets[k];
            if (state[j] < 0) {
              state[j] = 0;
              queue[end++] = j;
            }
          }
        }
      }
    }
  }
  return { ...result, unresolvedFlats, unresolvedCells, maxIncrement };
}

/** Number of bits set in a bit set: population count by halves (Warren 2012, Hacker's Delight, 2nd ed., §5-1). */
function countBits(set: Int32Array): number {
  let count = 0;
  for (let i = 0; i < set.length; i++) {
    let v = set[i];
    v = v - ((v >>> 1) & 0x55555555);
    v = (v & 0x33333333) + ((v >>> 2) & 0x33333333);
    count += (Math.imul((v + (v >>> 4)) & 0x0f0f0f0f, 0x01010101) >>> 24);
  }
  return count;
}

/** A bit set holding every interior cell of a w × h grid (the cells that can be flat). */
function interiorCells(w: number, h: number): Int32Array {
  const set = new Int32Array((w * h + 31) >>> 5);
  for (let y = 1; y < h - 1; y++) {
    for (let i = y * w + 1; i < y * w + w - 1; i++) set[i >> 5] |= 1 << (i & 31);
  }
  return set;
}

/**
 * Counts 8-connected groups of flat cells from the row scan: each row's flat cells form runs; a run
 * joins every run of the row above that it touches (columns overlapping or diagonally adjacent), with
 * union–find over run numbers (Rosenfeld & Pfaltz 1966, J. ACM 13(4):471–494, two-pass labelling).
 * Memory: one entry per run, and two rows of runs.
 */
class FlatRuns {
  private parent = new Int32Array(1024);
  private runs = 0;
  private joins = 0;
  private prevStart: Int32Array;
  private prevEnd: Int32Array;
  private prevId: Int32Array;
  private prevCount = 0;
  private curStart: Int32Array;
  private curEnd: Int32Array;
  private curId: Int32Array;
  private curCount = 0;

  constructor(width: number) {
    const most = (width >> 1) + 1; // runs are separated by at least one cell
    this.prevStart = new Int32Array(most);
    this.prevEnd = new Int32Array(most);
    this.prevId = new Int32Array(most);
    this.curStart = new Int32Array(most);
    this.curEnd = new Int32Array(most);
    this.curId = new Int32Array(most);
  }

  startRow(): void {
    this.curCount = 0;
  }

  /** column x of the current row is flat; columns arrive in increasing order */
  add(x: number): void {
    const last = this.curCount - 1;
    if (last >= 0 && this.curEnd[last] === x - 1) {
      this.curEnd[last] = x;
      return;
    }
    if (this.runs === this.parent.length) {
      const grown = new Int32Array(this.runs * 2);
      grown.set(this.parent);
      this.parent = grown;
    }
    this.parent[this.runs] = this.runs;
    this.curStart[this.curCount] = x;
    this.curEnd[this.curCount] = x;
    this.curId[this.curCount++] = this.runs++;
  }

  /** joins the current row's runs to the touching runs of the row above, then moves down a row */
  endRow(): void {
    let p = 0, q = 0;
    while (p < this.prevCount && q < this.curCount) {
      if (this.prevEnd[p] + 1 < this.curStart[q]) p++;
      else if (this.curEnd[q] + 1 < this.prevStart[p]) q++;
      else {
        this.join(this.prevId[p], this.curId[q]);
        if (this.prevEnd[p] < this.curEnd[q]) p++;
        else q++;
      }
    }
    [this.prevStart, this.curStart] = [this.curStart, this.prevStart];
    [this.prevEnd, this.curEnd] = [this.curEnd, this.prevEnd];
    [this.prevId, this.curId] = [this.curId, this.prevId];
    this.prevCount = this.curCount;
  }

  components(): number {
    return this.runs - this.joins;
  }

  private root(a: number): number {
    const parent = this.parent;
    while (parent[a] !== a) {
      parent[a] = parent[parent[a]]; // path halving
      a = parent[a];
    }
    return a;
  }

  private join(a: number, b: number): void {
    const ra = this.root(a), rb = this.root(b);
    if (ra === rb) return;
    this.parent[ra] = rb;
    this.joins++;
  }
}
