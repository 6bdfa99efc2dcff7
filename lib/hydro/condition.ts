// Conditioning and routing of a DEM on two threads: Priority-Flood and flat resolution (Barnes, Lehman & Mulla 2014),
// then D8 (O'Callaghan & Mark 1984); the work after the fill is split where it is independent.
import type { Grid } from "@/lib/raster/grid";
import type { CellGeometry } from "@/lib/raster/cell-geometry";
import { priorityFlood, type PriorityFloodResult } from "@/lib/hydro/priority-flood";
import { findFlats, finishFlats, stepsFromHigher, type FlatResolution } from "@/lib/hydro/flats";
import { d8Directions, d8InverseSteps, flatDescent } from "@/lib/hydro/d8";
import { HelperThread } from "@/lib/hydro/helper-thread";

export type ConditionStage = "fill" | "flats" | "directions";

export interface ConditionOptions {
  /** Priority-Flood+epsilon (no flats left, one thread) instead of the plain fill and flat resolution */
  epsilon?: boolean;
  /** checked inside the loops of this thread; an abort also ends the helper thread */
  signal?: AbortSignal;
  /** called as each stage starts */
  onStage?(stage: ConditionStage): void;
  /** called during the fill, the longest stage, with the share of it done (priorityFlood's onProgress) */
  onFillProgress?(fraction: number): void;
}

export interface Conditioned {
  /** the filled DEM: a copy of the input (in a SharedArrayBuffer), which is left as it was */
  dem: Grid<Float32Array>;
  directions: Grid<Uint8Array>;
  /** donor counts of the directions, for flowAccumulation's `donors` option */
  donors: Uint8Array;
  fill: PriorityFloodResult;
  /** null with `epsilon` */
  flats: Omit<FlatResolution, "increments"> | null;
  /** two arrays of one Int32 a cell the conditioning is done with (contents undefined), their pages
   *  mapped already, for flowAccumulation's `reuse`; null with `epsilon` */
  spare: [Int32Array, Int32Array] | null;
}

/**
 * Fills `elevation` (a copy of it), resolves its flats and sets D8 directions with donor counts. A helper
 * thread starts while the fill runs and maps the pages of the later stages' arrays, then sets the D8
 * directions of every cell from the elevations alone, which do not depend on the flats (flat cells get
 * NO_FLOW), while this thread finds the flats;
 * then the two breadth-first searches of the flat resolution run at once, towards lower terrain in the
 * helper and from higher terrain here. Last, both threads route the flat cells by their increments. The
 * results are those of priorityFlood, resolveFlats and d8Directions run one after another.
 */
export async function conditionAndRoute(elevation: Grid<Float32Array>, geometry: CellGeometry, options: ConditionOptions = {}): Promise<Conditioned> {
  const { width: w, height: h } = elevation;
  const n = w * h;
  const { signal, onStage } = options;
  if (elevation.data.length !== n) throw new RangeError(`grid data has ${elevation.data.length} cells, expected ${w}×${h} = ${n}`);
  if (geometry.dx.length !== h) throw new RangeError(`cell geometry has ${geometry.dx.length} rows, the grid has ${h}`);
  const bytes = (length: number) => new Uint8Array(new SharedArrayBuffer(length));

  if (options.epsilon) {
    onStage?.("fill");
    const dem = { data: elevation.data.slice(), width: w, height: h };
    const fill = priorityFlood(dem, { epsilon: true, signal, onProgress: options.onFillProgress });
    onStage?.("directions");
    const donors = new Uint8Array(n);
    return { dem, directions: d8Directions(dem, geometry, { donors, signal }), donors, fill, flats: null, spare: null };
  }

  const helper = new HelperThread(); // it starts up beside the fill
  try {
    onStage?.("fill");
    const z = new Float32Array(new SharedArrayBuffer(4 * n));
    z.set(elevation.data);
    const dem = { data: z, width: w, height: h };
    const candidates = new Int32Array((n + 31) >>> 5);
    // the arrays of the later stages get their pages mapped by the helper while this thread fills
    const dir = bytes(n), donors = bytes(n);
    const state = new Int32Array(new SharedArrayBuffer(4 * n)), towards = new Int32Array(new SharedArrayBuffer(4 * n));
    const touched = helper.run("touchPages", dir, donors, state, towards);
    const fill = priorityFlood(dem, { signal, flatCandidates: candidates, onProgress: options.onFillProgress });
    await touched;

    onStage?.("flats");
    const inv = new Float64Array(new SharedArrayBuffer(8 * 8 * h));
    inv.set(d8InverseSteps(geometry));
    const steepest = helper.run("steepestDescentRows", z, w, h, inv, dir, donors, 0, h);
    const search = findFlats(dem, { candidates, signal, shared: true, state });
    const towardsLower = helper.run("stepsTowardsLower", search.state, towards, search.towardsLower, search.wayOuts, w);
    const maxAway = stepsFromHigher(search.state, search.fromHigher, search.highEdges, w);
    signal?.throwIfAborted();
    const [reached] = await Promise.all([towardsLower, steepest]);
    const { increments, ...flats } = finishFlats(search, towards, maxAway, reached, signal);

    onStage?.("directions");
    // The flat cells drain on both threads, a half each, but for the two rows at the middle: a cell adds
    // to the donor count of a neighbour, so each thread's cells stay off the rows the other one adds to.
    const middle = h >> 1;
    const southern = helper.run("flatDescentRows", z, w, h, inv, increments, dir, donors, middle + 1, h);
    flatDescent(dem, inv, increments, dir, donors, signal, 0, middle - 1);
    await southern;
    flatDescent(dem, inv, increments, dir, donors, signal, Math.max(0, middle - 1), middle + 1);
    return { dem, directions: { data: dir, width: w, height: h }, donors, fill, flats, spare: [state, towards] };
  } finally {
    helper.close();
  }
}
