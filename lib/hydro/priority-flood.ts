// Barnes, Lehman & Mulla (2014), Computers & Geosciences 62:117–127: Priority-Flood with the plain queue (Alg. 2) and the epsilon variant (Alg. 3); slope cells traced outside the priority queue as in Zhou, Sun & Fu (2016), C&G 90:87–96.
import type { Grid } from "@/lib/raster/grid";
import { D8_DX, D8_DY } from "@/lib/hydro/neighbours";
import { ABORT_CHECK_CELLS } from "@/lib/hydro/cancellation";

export interface PriorityFloodOptions {
  /** raise every filled cell one Float32 step above the cell that floods it, so the result drains
   *  strictly downhill everywhere (no flats left); default false: flats stay and `resolveFlats` routes them */
  epsilon?: boolean;
  /** expand cells on slopes (no open neighbour below them) straight away instead of through the
   *  priority queue, which cannot change the result (Zhou et al. 2016); default true, false for the
   *  plain method of Barnes et al. 2014 */
  traceSlopes?: boolean;
  /** checked every ABORT_CHECK_CELLS cells; an aborted signal throws its reason */
  signal?: AbortSignal;
  /** called every ABORT_CHECK_CELLS cells with the share of the valid cells expanded so far (0–1) */
  onProgress?(fraction: number): void;
  /** a zeroed bit set of (width·height + 31) >> 5 words (cell j is bit j & 31 of word j >> 5) in which
   *  the flood sets the bit of every cell it raises or closes from a neighbour of equal elevation. Every
   *  flat cell (no lower neighbour) is among them, since the cell that closes another is never higher
   *  than it ends up; `resolveFlats` then tests these cells only, not the whole grid. */
  flatCandidates?: Int32Array;
}

export interface PriorityFloodResult {
  /** cells that hold an elevation (not NaN) */
  validCells: number;
  /** cells the flood started from: valid cells on the grid edge or next to nodata */
  seedCells: number;
  /** cells whose elevation the fill increased */
  cellsRaised: number;
  /** largest increase of one cell, in the DEM's vertical unit */
  maxRaise: number;
  /** cells closed through the plain queue (inside depressions) instead of the priority queue */
  plainQueueCells: number;
  /** cells expanded on a slope without passing through the priority queue (`traceSlopes`) */
  slopeTracedCells: number;
  /** largest number of cells the priority queue held at once (8 bytes per entry, buckets grow by doubling) */
  heapPeak: number;
}

/** First capacity of the growable queues (entries); they double when full. */
const INITIAL_QUEUE_CAPACITY = 1 << 12;

// One shared view pair for stepping Float32 values bit by bit, allocated once.
const f32Scratch = new Float32Array(1);
const i32Scratch = new Int32Array(f32Scratch.buffer);

/** The smallest Float32 strictly greater than the Float32 value `z` (IEEE 754 nextUp): the epsilon
 *  step of the variant, so the increment is one unit in the last place whatever the elevation. */
export function nextUpFloat32(z: number): number {
  f32Scratch[0] = z;
  const v = f32Scratch[0];
  if (v !== v || v === Infinity) return v;
  if (v === 0) {
    i32Scratch[0] = 1; // +0 and −0 both step to the smallest positive subnormal
    return f32Scratch[0];
  }
  // For IEEE floats of one sign the bit patterns are ordered like the values.
  i32Scratch[0] += v > 0 ? 1 : -1;
  return f32Scratch[0];
}

/** Elevation bits → an Int32 whose signed order is the Float32 order (negative floats have their
 *  magnitude bits flipped). −0 maps just below +0; the queue clamps it, the two being equal heights. */
function orderedKey(bits: number): number {
  return bits ^ ((bits >> 31) & 0x7fffffff);
}

/** The elevation of an ordered key (the inverse of `orderedKey`: the flip is its own inverse). */
function keyElevation(key: number): number {
  i32Scratch[0] = key ^ ((key >> 31) & 0x7fffffff);
  return f32Scratch[0];
}

/** Radix of the priority queue: keys split into 4 digits of 8 bits, so an entry moves at most 3 times. */
const DIGIT_BITS = 8;
const DIGITS = 32 / DIGIT_BITS;
const RADIX = 1 << DIGIT_BITS;
/** First capacity of one bucket of the priority queue (entries); buckets double when full. */
const INITIAL_BUCKET_CAPACITY = 16;

/**
 * Priority queue of (elevation, cell) for keys that never fall below the last key taken out, as in
 * Priority-Flood, where the flood level only rises: a radix heap with radix 2⁸ (Ahuja, Mehlhorn, Orlin
 * & Tarjan 1990, J. ACM 37(2):213–223, §4). Bucket (d, v) holds the keys whose highest 8-bit digit
 * differing from the last key taken is digit d, and whose digit d is v; the keys of a bucket of level 0
 * are all equal. Taking from an empty level 0 empties the lowest bucket of the lowest non-empty level
 * into the levels below it, so an entry moves at most 3 times (a base-2 radix heap moves each entry
 * ~10 times on elevation keys). Keys and cells sit in parallel typed arrays: no object per cell.
 */
class RadixQueue {
  private keys: Int32Array[] = [];
  private cells: Int32Array[] = [];
  private counts = new Int32Array(DIGITS * RADIX);
  /** one bit per bucket, set while it holds entries: finds the lowest bucket of a level in 8 words */
  private occupied = new Int32Array((DIGITS * RADIX) >> 5);
  /** last key taken out, which is the key of the entry `pop` returned; starts at the lowest key so
   *  any first key is accepted */
  last = -0x80000000;
  size = 0;
  peak = 0;

  constructor() {
    for (let b = 0; b < DIGITS * RADIX; b++) {
      this.keys.push(new Int32Array(INITIAL_BUCKET_CAPACITY));
      this.cells.push(new Int32Array(INITIAL_BUCKET_CAPACITY));
    }
  }

  push(key: number, cell: number): void {
    if (key < this.last) key = this.last; // only −0 after +0 can get here
    this.append(this.bucket(key), key, cell);
    if (++this.size > this.peak) this.peak = this.size;
  }

  /** removes an entry with the lowest key and returns its cell; the caller checks `size > 0` first */
  pop(): number {
    let b = this.lowestBucket(0);
    if (b < 0) {
      this.refill();
      b = this.lowestBucket(0);
    }
    const at = --this.counts[b];
    if (at === 0) this.occupied[b >> 5] &= ~(1 << (b & 31));
    this.size--;
    this.last = this.keys[b][at];
    return this.cells[b][at];
  }

  /** Bucket of a key not below `last`: level = highest differing digit, then the key's digit there,
   *  taken with the sign bit flipped so that digits order like the signed keys. */
  private bucket(key: number): number {
    const level = (31 - Math.clz32((key ^ this.last) | 1)) >> 3;
    return (level << DIGIT_BITS) | (((key ^ 0x80000000) >>> (level << 3)) & (RADIX - 1));
  }

  /** lowest occupied bucket of a level, or −1 */
  private lowestBucket(level: number): number {
    const first = (level << DIGIT_BITS) >> 5;
    for (let w = first; w < first + (RADIX >> 5); w++) {
      const bits = this.occupied[w];
      if (bits !== 0) return (w << 5) + 31 - Math.clz32(bits & -bits);
    }
    return -1;
  }

  private refill(): void {
    let b = -1;
    for (let level = 1; b < 0; level++) b = this.lowestBucket(level);
    const keys = this.keys[b], cells = this.cells[b], count = this.counts[b];
    let low = keys[0];
    for (let i = 1; i < count; i++) if (keys[i] < low) low = keys[i];
    this.last = low;
    this.counts[b] = 0;
    this.occupied[b >> 5] &= ~(1 << (b & 31));
    // every key here shares its digits from this level up with `low`, so it lands on a lower level
    for (let i = 0; i < count; i++) this.append(this.bucket(keys[i]), keys[i], cells[i]);
  }

  private append(b: number, key: number, cell: number): void {
    const at = this.counts[b]++;
    if (at === 0) this.occupied[b >> 5] |= 1 << (b & 31);
    if (at === this.keys[b].length) {
      const keys = new Int32Array(at * 2), cells = new Int32Array(at * 2);
      keys.set(this.keys[b]);
      cells.set(this.cells[b]);
      this.keys[b] = keys;
      this.cells[b] = cells;
    }
    this.keys[b][at] = key;
    this.cells[b][at] = cell;
  }
}

/** FIFO of cell indices; it rewinds whenever it runs empty (the plain queue drains fully between
 *  two priority-queue pops) and shifts or doubles when it reaches the end. */
class CellQueue {
  items = new Int32Array(INITIAL_QUEUE_CAPACITY);
  head = 0;
  tail = 0;

  push(cell: number): void {
    if (this.tail === this.items.length) this.makeRoom();
    this.items[this.tail++] = cell;
  }

  shift(): number {
    const cell = this.items[this.head++];
    if (this.head === this.tail) this.head = this.tail = 0;
    return cell;
  }

  private makeRoom(): void {
    const live = this.tail - this.head;
    if (this.head >= live) {
      this.items.copyWithin(0, this.head, this.tail);
    } else {
      const items = new Int32Array(this.items.length * 2);
      items.set(this.items.subarray(this.head, this.tail));
      this.items = items;
    }
    this.head = 0;
    this.tail = live;
  }
}

/** LIFO stack of cell indices that doubles when full. */
class CellStack {
  items = new Int32Array(INITIAL_QUEUE_CAPACITY);
  length = 0;

  push(cell: number): void {
    if (this.length === this.items.length) {
      const items = new Int32Array(this.items.length * 2);
      items.set(this.items);
      this.items = items;
    }
    this.items[this.length++] = cell;
  }

  pop(): number {
    return this.items[--this.length];
  }
}

/**
 * Fills every depression of `dem` IN PLACE so that each valid cell has a non-ascending 8-connected
 * path to the grid edge or to nodata (strictly descending with `epsilon`). NaN cells are nodata and
 * stay NaN; the edge and nodata are where water leaves the grid.
 */
export function priorityFlood(dem: Grid<Float32Array>, options: PriorityFloodOptions = {}): PriorityFloodResult {
  const { data: z, width: w, height: h } = dem;
  if (z.length !== w * h) {
    throw new RangeError(`grid data has ${z.length} cells, expected ${w}×${h} = ${w * h}`);
  }
  const epsilon = options.epsilon === true;
  const signal = options.signal;
  signal?.throwIfAborted();
  const n = w * h;
  const words = (n + 31) >>> 5;
  if (options.flatCandidates !== undefined && options.flatCandidates.length !== words) {
    throw new RangeError(`flat candidates have ${options.flatCandidates.length} words, expected ${words} for ${n} cells`);
  }
  const marks = options.flatCandidates;
  // One bit per cell (n/8 bytes: 2 MB on a 4096² grid, which stays in cache where a byte per cell
  // would not), with a closed row and one closed cell before and after the grid: cell j is bit j + pad.
  // A cell's eight neighbours are then three runs of three bits, read in three loads.
  const pad = w + 1;
  const closed = new Int32Array((n + 2 * pad + 31) >>> 5); // the last run, of the last cell, ends at the last padding bit
  const close = (j: number) => {
    closed[(j + pad) >> 5] |= 1 << ((j + pad) & 31);
  };
  const isClosed = (j: number) => (closed[(j + pad) >> 5] & (1 << ((j + pad) & 31))) !== 0;
  for (let j = -pad; j < 0; j++) close(j);
  for (let j = n; j < n + pad; j++) close(j);
  /** three bits of the closed set from cell p on */
  const closedRun = (p: number) => {
    const q = p + pad, b = q & 31;
    const v = closed[q >> 5] >>> b;
    return (b > 29 ? v | (closed[(q >> 5) + 1] << (32 - b)) : v) & 7;
  };
  // Bit k of an open-neighbour mask is the neighbour at neighbourOffsets[k]: the row above, west and
  // east, the row below. Each cell is opened once, so a cell has on average one open neighbour when it
  // is expanded; walking the mask's bits skips the closed ones without a test each.
  const neighbourOffsets = Int32Array.of(-w - 1, -w, -w + 1, -1, 1, w - 1, w, w + 1);
  const openNeighbours = (c: number) => {
    const middle = closedRun(c - 1);
    return ~(closedRun(c - w - 1) | ((middle & 1) << 3) | ((middle & 4) << 2) | (closedRun(c + w - 1) << 5)) & 0xff;
  };
  const heap = new RadixQueue();
  const bits = new Int32Array(z.buffer, z.byteOffset, n);
  const pit = new CellQueue();

  // Seeds: every valid edge cell. Every edge cell is closed from the start, so an offset that wraps
  // across the left or right edge lands on a closed cell, as do those above and below the grid.
  let seedCells = 0;
  let nodataCells = 0;
  const seedEdge = (i: number) => {
    close(i);
    const zi = z[i];
    if (zi === zi) {
      heap.push(orderedKey(bits[i]), i);
      seedCells++;
    }
  };
  for (let x = 0; x < w; x++) {
    seedEdge(x);
    if (h > 1) seedEdge((h - 1) * w + x);
  }
  for (let y = 1; y < h - 1; y++) {
    seedEdge(y * w);
    if (w > 1) seedEdge(y * w + w - 1);
  }
  for (let i = 0; i < n; i++) {
    if (z[i] !== z[i]) {
      close(i);
      nodataCells++;
    }
  }
  // Valid cells next to nodata are seeds too; found from the nodata side so a DEM without holes pays
  // only the scan above.
  if (nodataCells > 0) {
    for (let y = 0; y < h; y++) {
      for (let x = 0; x < w; x++) {
        const i = y * w + x;
        if (z[i] === z[i]) continue;
        for (let k = 0; k < 8; k++) {
          const nx = x + D8_DX[k], ny = y + D8_DY[k];
          if (nx < 0 || ny < 0 || nx >= w || ny >= h) continue;
          const j = ny * w + nx;
          if (!isClosed(j)) {
            close(j);
            heap.push(orderedKey(bits[j]), j);
            seedCells++;
          }
        }
      }
    }
  }

  const traceSlopes = options.traceSlopes !== false;
  const onProgress = options.onProgress;
  const slope = new CellStack();
  let cellsRaised = 0;
  let maxRaise = 0;
  let plainQueueCells = 0;
  let slopeTracedCells = 0;
  let processed = 0;
  let drainLevel = 0;
  // Imported bindings are read once: under CommonJS interop (tsx, bundlers) every read is a getter call.
  const abortMask = ABORT_CHECK_CELLS - 1;
  for (;;) {
    if ((++processed & abortMask) === 0) {
      signal?.throwIfAborted();
      // a slope cell with an open neighbour below is looked at twice, so the count may pass the cells
      onProgress?.(Math.min(1, processed / (n - nodataCells)));
    }
    // Every closed cell not yet expanded bounds the flooded region. A slope cell (no open neighbour
    // below its level) raises nothing, so it is expanded at once; the others wait for their turn.
    if (slope.length > 0) {
      const t = slope.pop();
      const zt = z[t];
      const level = epsilon ? nextUpFloat32(zt) : zt;
      const open = openNeighbours(t);
      let below = false;
      for (let m = open; m !== 0; m &= m - 1) {
        if (z[t + neighbourOffsets[31 - Math.clz32(m & -m)]] < level) {
          below = true;
          break;
        }
      }
      if (below) {
        heap.push(orderedKey(bits[t]), t);
        continue;
      }
      slopeTracedCells++;
      for (let m = open; m !== 0; m &= m - 1) {
        const j = t + neighbourOffsets[31 - Math.clz32(m & -m)];
        close(j);
        if (marks !== undefined && z[j] === zt) marks[j >> 5] |= 1 << (j & 31);
        slope.push(j);
      }
      continue;
    }
    // Plain-queue cells sit at the current flood level (a few Float32 steps above it with epsilon), so
    // they come before the priority queue, whose keys are never below that level.
    // The elevation of the cell comes from the queue, not from z: a cell popped from the priority
    // queue was pushed long before and z[c] is rarely still in cache. Without epsilon every plain-queue
    // cell sits at the level of the priority-queue cell that started the current drain.
    let c: number, zc: number;
    if (pit.tail > 0) {
      c = pit.shift();
      zc = epsilon ? z[c] : drainLevel;
    } else if (heap.size > 0) {
      c = heap.pop();
      // key 0 may be a −0 clamped to +0 (see orderedKey): read that one's sign from the grid
      zc = heap.last === 0 ? z[c] : keyElevation(heap.last);
      drainLevel = zc;
    } else break;
    const level = epsilon ? nextUpFloat32(zc) : zc;
    for (let m = openNeighbours(c); m !== 0; m &= m - 1) {
      const j = c + neighbourOffsets[31 - Math.clz32(m & -m)];
      close(j);
      const zj = z[j];
      if (zj < level) {
        cellsRaised++;
        if (level - zj > maxRaise) maxRaise = level - zj;
        z[j] = level;
        if (marks !== undefined) marks[j >> 5] |= 1 << (j & 31);
        pit.push(j);
        plainQueueCells++;
      } else if (zj === zc) {
        if (marks !== undefined) marks[j >> 5] |= 1 << (j & 31);
        pit.push(j); // already at the flood level: no priority needed
        plainQueueCells++;
      } else if (traceSlopes) {
        slope.push(j);
      } else {
        heap.push(orderedKey(bits[j]), j);
      }
    }
  }

  return {
    validCells: n - nodataCells,
    seedCells,
    cellsRaised,
    maxRaise,
    plainQueueCells,
    slopeTracedCells,
    heapPeak: heap.peak,
  };
}
