// Drainage-tree topology from mapped lines: endpoint snapping and planar graph building as in the arc–node
// model of Peucker & Chrisman (1975), The American Cartographer 2(1):55–69; links and junctions as Shreve (1966).
import proj4 from "proj4";
import { geodesicDistance } from "@/lib/raster/geodesy";
import type { StreamLink, StreamNetwork } from "./model";

/** How the upstream→downstream sense of each input line is hinted (used to choose outlets, and checked). */
export type OrientationHint =
  /** vertex order runs downstream (the common digitising convention) */
  | { kind: "vertex-order" }
  /** per line: +1 vertex order runs downstream, −1 it runs upstream, 0 unknown (from a flow-direction field) */
  | { kind: "signs"; signs: Int8Array }
  /** per line: index of the line it flows into, −1 none or unknown (from a downstream-id field) */
  | { kind: "downstream-line"; downstreamOf: Int32Array };

export interface FromLinesOptions {
  /** proj4 definition of the line coordinates */
  crs: string;
  /** endpoints closer than this are one node, and an endpoint this close to another line splits it, m */
  snapToleranceM: number;
  /** a source edge shorter than this hanging off a junction is dropped as a digitising overshoot, m; 0 keeps all */
  dangleLengthM: number;
  /** outlet point in the lines' CRS; it snaps to the nearest node within `radiusM` */
  outlet?: { x: number; y: number; radiusM: number };
  /** elevation at a point of the lines' CRS, m (NaN when unknown): each component drains to its lowest end */
  elevationAt?: (x: number, y: number) => number;
  orientation?: OrientationHint;
  /** analyse every connected component, or only the one with the greatest total length */
  components: "each" | "largest";
}

export interface TopologyLocation {
  /** position in the lines' CRS */
  x: number;
  y: number;
  lon: number;
  lat: number;
  /** length of the channel concerned, m */
  lengthM: number;
}

export interface TopologyReport {
  snapToleranceM: number;
  dangleLengthM: number;
  lines: number;
  /** line pieces after splitting at junctions */
  pieces: number;
  /** endpoints moved onto another endpoint (distance > 0, ≤ tolerance) */
  snappedEndpoints: number;
  /** lines split where another line ends on them */
  midLineJunctions: number;
  /** line pieces whose vertex order ran upstream, reversed into the flow direction */
  reversedPieces: number;
  /** pieces whose flow disagrees with a flow-direction or downstream-id attribute (null without one) */
  attributeConflicts: number | null;
  dangles: { dropped: number; lengthM: number };
  /** Loops and braids: every node drains along its shortest flow path to the outlet (Dijkstra on length);
   *  a channel on no such path closes a loop and is removed. Locations are the removed channels' midpoints. */
  loops: { count: number; removedLengthM: number; locations: TopologyLocation[] };
  components: { count: number; analysed: number; rule: "each" | "largest"; droppedLengthM: number };
  /** one per analysed component (the 100 longest), `lengthM` its channel length; how its outlet was chosen */
  outlets: (TopologyLocation & { rule: "point" | "lowest-end" | "digitising"; snapDistanceM: number | null })[];
  /** total length of the links in the network, m */
  networkLengthM: number;
}

export interface FromLinesResult {
  network: StreamNetwork;
  report: TopologyReport;
}

/** Locations listed in the report at most; counts and lengths cover all. */
const MAX_REPORTED_LOCATIONS = 100;
/** Keys of the spatial hash stay below 2^53 with at most 2^24 cells per axis. */
const MAX_CELLS_PER_AXIS = 2 ** 24;

const WGS84_LONLAT = "+proj=longlat +datum=WGS84 +no_defs";

class UnionFind {
  readonly parent: Int32Array;
  constructor(n: number) {
    this.parent = new Int32Array(n);
    for (let i = 0; i < n; i++) this.parent[i] = i;
  }
  find(i: number): number {
    const p = this.parent;
    while (p[i] !== i) {
      p[i] = p[p[i]];
      i = p[i];
    }
    return i;
  }
  union(a: number, b: number): void {
    const ra = this.find(a), rb = this.find(b);
    if (ra !== rb) this.parent[Math.max(ra, rb)] = Math.min(ra, rb);
  }
}

/** Uniform grid over planar metres: points or sampled segments go into cells, a query reads the cells a box
 *  covers. Entries are collected as (cell, item) pairs and packed by cell into one typed array before the
 *  first query (a counting sort), so millions of entries cost two typed arrays, not an array per cell. */
class SpatialHash {
  private keys = new Float64Array(1024);
  private items = new Int32Array(1024);
  private size = 0;
  /** cell key → bucket; bucket b holds packed[start[b] … start[b + 1]) */
  private buckets: Map<number, number> | null = null;
  private start = new Int32Array(0);
  private packed = new Int32Array(0);
  private readonly ny: number;
  constructor(private readonly minX: number, private readonly minY: number, maxY: number, private readonly cell: number) {
    this.ny = Math.floor((maxY - minY) / cell) + 2;
  }
  private ix(x: number): number { return Math.floor((x - this.minX) / this.cell); }
  private iy(y: number): number { return Math.floor((y - this.minY) / this.cell); }
  private add(item: number, key: number): void {
    if (this.size === this.keys.length) {
      const keys = new Float64Array(this.size * 2); keys.set(this.keys); this.keys = keys;
      const items = new Int32Array(this.size * 2); items.set(this.items); this.items = items;
    }
    this.keys[this.size] = key;
    this.items[this.size++] = item;
  }
  insertPoint(item: number, x: number, y: number): void {
    this.add(item, this.ix(x) * this.ny + this.iy(y));
  }
  /** Into the cells of points sampled along the segment at most half a cell apart, so every point of the
   *  segment is within a quarter cell of a sample; work grows with length, not with the bounding box. */
  insertSegment(item: number, x0: number, y0: number, x1: number, y1: number): void {
    const steps = Math.ceil((2 * Math.hypot(x1 - x0, y1 - y0)) / this.cell);
    let last = NaN;
    for (let k = 0; k <= steps; k++) {
      const t = steps === 0 ? 0 : k / steps;
      const key = this.ix(x0 + t * (x1 - x0)) * this.ny + this.iy(y0 + t * (y1 - y0));
      if (key !== last) this.add(item, key);
      last = key;
    }
  }
  private build(): Map<number, number> {
    const buckets = new Map<number, number>();
    const bucketOf = new Int32Array(this.size);
    for (let e = 0; e < this.size; e++) {
      let b = buckets.get(this.keys[e]);
      if (b === undefined) buckets.set(this.keys[e], (b = buckets.size));
      bucketOf[e] = b;
    }
    const start = new Int32Array(buckets.size + 1);
    for (let e = 0; e < this.size; e++) start[bucketOf[e] + 1]++;
    for (let b = 0; b < buckets.size; b++) start[b + 1] += start[b];
    const fill = start.slice(0, buckets.size);
    const packed = new Int32Array(this.size);
    for (let e = 0; e < this.size; e++) packed[fill[bucketOf[e]]++] = this.items[e];
    this.start = start;
    this.packed = packed;
    this.keys = new Float64Array(0);
    this.items = new Int32Array(0);
    return (this.buckets = buckets);
  }
  query(x0: number, y0: number, x1: number, y1: number, visit: (item: number) => void): void {
    const buckets = this.buckets ?? this.build();
    for (let i = this.ix(x0); i <= this.ix(x1); i++) {
      for (let j = this.iy(y0); j <= this.iy(y1); j++) {
        const b = buckets.get(i * this.ny + j);
        if (b === undefined) continue;
        for (let k = this.start[b]; k < this.start[b + 1]; k++) visit(this.packed[k]);
      }
    }
  }
}

/** Planar metres for topology, and lengths along paths: projected units × to_meter, or an azimuthal
 *  equidistant frame centred on the data with geodesic lengths for geographic coordinates. */
interface Frame {
  toPlanar(x: number, y: number): [number, number];
  toLonLat(x: number, y: number): [number, number];
  pathLengthM(path: Float64Array): number;
}

function makeFrame(crs: string, lines: Float64Array[]): Frame {
  const proj = proj4.Proj(crs) as unknown as { projName?: string; to_meter?: number };
  const toLonLat = proj4(crs, WGS84_LONLAT);
  const lonLat = (x: number, y: number) => toLonLat.forward([x, y]) as [number, number];
  if (proj.projName === "longlat") {
    let minX = Infinity, maxX = -Infinity, minY = Infinity, maxY = -Infinity;
    for (const l of lines) for (let i = 0; i < l.length; i += 2) {
      minX = Math.min(minX, l[i]); maxX = Math.max(maxX, l[i]);
      minY = Math.min(minY, l[i + 1]); maxY = Math.max(maxY, l[i + 1]);
    }
    const aeqd = proj4(crs, `+proj=aeqd +lat_0=${(minY + maxY) / 2} +lon_0=${(minX + maxX) / 2} +datum=WGS84 +units=m +no_defs`);
    return {
      toPlanar: (x, y) => aeqd.forward([x, y]) as [number, number],
      toLonLat: lonLat,
      pathLengthM(path) {
        let s = 0;
        for (let i = 2; i < path.length; i += 2) s += geodesicDistance(path[i - 2], path[i - 1], path[i], path[i + 1]);
        return s;
      },
    };
  }
  const k = proj.to_meter ?? 1;
  return {
    toPlanar: (x, y) => [x * k, y * k],
    toLonLat: lonLat,
    pathLengthM(path) {
      let s = 0;
      for (let i = 2; i < path.length; i += 2) s += Math.hypot(path[i] - path[i - 2], path[i + 1] - path[i - 1]);
      return s * k;
    },
  };
}

interface Piece {
  line: number;
  from: number;
  to: number;
  /** CRS vertices in the line's vertex order */
  path: Float64Array;
  lengthM: number;
}

/** A chain of pieces between two nodes that are not simple pass-through points. */
interface Edge {
  a: number;
  b: number;
  /** pieces in order from a to b, and whether each runs a→b in its vertex order */
  pieces: number[];
  forward: boolean[];
  lengthM: number;
  alive: boolean;
}

/**
 * Builds the directed drainage tree of mapped lines. Lines are snapped and split into a planar graph,
 * pass-through nodes merged, dangles and loops handled as documented in TopologyReport, and each
 * connected component rooted at the given outlet, its lowest end (with elevations), or the end that
 * leaves the fewest lines reversed against their orientation hint.
 */
export function networkFromLines(lines: Float64Array[], options: FromLinesOptions): FromLinesResult {
  const { snapToleranceM: tol, dangleLengthM } = options;
  if (!(tol >= 0 && Number.isFinite(tol))) throw new RangeError(`snapping tolerance must be a finite number ≥ 0 m, got ${tol}`);
  if (!(dangleLengthM >= 0 && Number.isFinite(dangleLengthM))) throw new RangeError(`dangle length must be a finite number ≥ 0 m, got ${dangleLengthM}`);
  if (lines.length === 0) throw new RangeError("no lines were given");
  for (let i = 0; i < lines.length; i++) {
    if (lines[i].length < 4 || lines[i].length % 2 !== 0) throw new RangeError(`line ${i} needs at least two x,y vertices`);
  }
  if (options.outlet && !(options.outlet.radiusM > 0)) throw new RangeError(`outlet radius must be positive, got ${options.outlet.radiusM}`);
  const frame = makeFrame(options.crs, lines);

  // --- 1. endpoints snapped into nodes -------------------------------------------------------------
  const nEnd = 2 * lines.length;
  const ex = new Float64Array(nEnd), ey = new Float64Array(nEnd);
  const planarLines = lines.map((l) => {
    const p = new Float64Array(l.length);
    for (let i = 0; i < l.length; i += 2) [p[i], p[i + 1]] = frame.toPlanar(l[i], l[i + 1]);
    return p;
  });
  let minX = Infinity, minY = Infinity, maxX = -Infinity, maxY = -Infinity;
  for (const p of planarLines) for (let i = 0; i < p.length; i += 2) {
    minX = Math.min(minX, p[i]); maxX = Math.max(maxX, p[i]);
    minY = Math.min(minY, p[i + 1]); maxY = Math.max(maxY, p[i + 1]);
  }
  planarLines.forEach((p, i) => {
    ex[2 * i] = p[0]; ey[2 * i] = p[1];
    ex[2 * i + 1] = p[p.length - 2]; ey[2 * i + 1] = p[p.length - 1];
  });
  const extent = Math.max(maxX - minX, maxY - minY, 1);
  const endCell = Math.max(tol, extent / MAX_CELLS_PER_AXIS);
  const endHash = new SpatialHash(minX - endCell, minY - endCell, maxY + endCell, endCell);
  for (let e = 0; e < nEnd; e++) endHash.insertPoint(e, ex[e], ey[e]);
  const uf = new UnionFind(nEnd);
  for (let e = 0; e < nEnd; e++) {
    endHash.query(ex[e] - tol, ey[e] - tol, ex[e] + tol, ey[e] + tol, (f) => {
      if (f > e && Math.hypot(ex[f] - ex[e], ey[f] - ey[e]) <= tol) uf.union(e, f);
    });
  }
  // node ids sorted by the representative's CRS coordinates, so that no result depends on feature order
  const endX = (e: number) => lines[e >> 1][(e & 1) === 0 ? 0 : lines[e >> 1].length - 2];
  const endY = (e: number) => lines[e >> 1][(e & 1) === 0 ? 1 : lines[e >> 1].length - 1];
  const lexLess = (a: number, b: number) => endX(a) < endX(b) || (endX(a) === endX(b) && endY(a) < endY(b));
  const rep = new Int32Array(nEnd).fill(-1);
  for (let e = 0; e < nEnd; e++) {
    const r = uf.find(e);
    if (rep[r] < 0 || lexLess(e, rep[r])) rep[r] = e;
  }
  const reps: number[] = [];
  for (let e = 0; e < nEnd; e++) if (uf.find(e) === e) reps.push(rep[e]);
  reps.sort((a, b) => (lexLess(a, b) ? -1 : lexLess(b, a) ? 1 : 0));
  const nodeOfRoot = new Int32Array(nEnd);
  reps.forEach((r, id) => { nodeOfRoot[uf.find(r)] = id; });
  const nodeOfEnd = new Int32Array(nEnd);
  let snappedEndpoints = 0;
  for (let e = 0; e < nEnd; e++) {
    nodeOfEnd[e] = nodeOfRoot[uf.find(e)];
    if (endX(e) !== endX(reps[nodeOfEnd[e]]) || endY(e) !== endY(reps[nodeOfEnd[e]])) snappedEndpoints++;
  }
  const nNodes = reps.length;
  const nodeX = Float64Array.from(reps, endX), nodeY = Float64Array.from(reps, endY);
  const nodePX = Float64Array.from(reps, (e) => ex[e]), nodePY = Float64Array.from(reps, (e) => ey[e]);

  // --- 2. lines split where a node falls on them mid-line ---------------------------------------------
  const segLengths: number[] = [];
  for (const p of planarLines) for (let i = 2; i < p.length; i += 2) segLengths.push(Math.hypot(p[i] - p[i - 2], p[i + 1] - p[i - 1]));
  segLengths.sort((a, b) => a - b);
  const segCell = Math.max(tol, segLengths[segLengths.length >> 1] || 1, extent / MAX_CELLS_PER_AXIS);
  const segHash = new SpatialHash(minX - segCell, minY - segCell, maxY + segCell, segCell);
  const segLine: number[] = [], segIndex: number[] = [];
  planarLines.forEach((p, l) => {
    for (let i = 2; i < p.length; i += 2) {
      segHash.insertSegment(segLine.length, p[i - 2], p[i - 1], p[i], p[i + 1]);
      segLine.push(l);
      segIndex.push(i / 2 - 1);
    }
  });
  // per line: the nodes falling on it, at the closest (segment, parameter)
  const splits = new Map<number, Map<number, { seg: number; t: number; d: number }>>();
  for (let n = 0; n < nNodes; n++) {
    const px = nodePX[n], py = nodePY[n];
    // a segment point within tol of the node has a sample within tol + segCell/4 of it
    const r = tol + segCell / 4;
    segHash.query(px - r, py - r, px + r, py + r, (s) => {
      const l = segLine[s];
      if (nodeOfEnd[2 * l] === n || nodeOfEnd[2 * l + 1] === n) return;
      const p = planarLines[l], k = 2 * segIndex[s];
      const dx = p[k + 2] - p[k], dy = p[k + 3] - p[k + 1];
      const len2 = dx * dx + dy * dy;
      const t = len2 > 0 ? Math.min(1, Math.max(0, ((px - p[k]) * dx + (py - p[k + 1]) * dy) / len2)) : 0;
      const d = Math.hypot(p[k] + t * dx - px, p[k + 1] + t * dy - py);
      if (d > tol) return;
      let onLine = splits.get(l);
      if (!onLine) splits.set(l, (onLine = new Map()));
      const best = onLine.get(n);
      if (!best || d < best.d) onLine.set(n, { seg: segIndex[s], t, d });
    });
  }
  const pieces: Piece[] = [];
  let midLineJunctions = 0;
  for (let l = 0; l < lines.length; l++) {
    const src = lines[l];
    const cuts = [...(splits.get(l) ?? new Map()).entries()]
      .map(([node, c]) => ({ node, seg: c.seg, t: c.t }))
      .sort((a, b) => a.seg - b.seg || a.t - b.t || a.node - b.node);
    midLineJunctions += cuts.length;
    let from = nodeOfEnd[2 * l];
    let verts: number[] = [nodeX[from], nodeY[from]];
    const push = (x: number, y: number) => {
      if (verts[verts.length - 2] !== x || verts[verts.length - 1] !== y) verts.push(x, y);
    };
    let c = 0;
    const nv = src.length / 2;
    for (let v = 1; v < nv; v++) {
      while (c < cuts.length && cuts[c].seg === v - 1) {
        const cut = cuts[c++];
        push(nodeX[cut.node], nodeY[cut.node]);
        if (cut.node !== from) addPiece(l, from, cut.node, verts);
        from = cut.node;
        verts = [nodeX[from], nodeY[from]];
      }
      if (v < nv - 1) push(src[2 * v], src[2 * v + 1]);
    }
    const to = nodeOfEnd[2 * l + 1];
    push(nodeX[to], nodeY[to]);
    addPiece(l, from, to, verts);
  }
  function addPiece(line: number, from: number, to: number, verts: number[]): void {
    if (verts.length < 4) return; // a zero-length piece between two cuts at one node
    const path = Float64Array.from(verts);
    pieces.push({ line, from, to, path, lengthM: frame.pathLengthM(path) });
  }

  const hint = orientationSigns(options.orientation, lines.length, pieces, nodeOfEnd);

  // --- 3. outlet node, then pieces chained into edges between non-pass-through nodes -----------------
  const loopLocations: TopologyLocation[] = [];
  let loopCount = 0, loopLength = 0;
  const incident: number[][] = Array.from({ length: nNodes }, () => []);
  pieces.forEach((p, i) => {
    if (p.from === p.to) {
      recordLoop(p.path, p.lengthM); // a line closing on itself
      return;
    }
    incident[p.from].push(i);
    incident[p.to].push(i);
  });
  let outletNode = -1, outletSnapM: number | null = null;
  if (options.outlet) {
    const [ox, oy] = frame.toPlanar(options.outlet.x, options.outlet.y);
    let best = Infinity;
    for (let n = 0; n < nNodes; n++) {
      if (incident[n].length === 0) continue;
      const d = Math.hypot(nodePX[n] - ox, nodePY[n] - oy);
      if (d < best) { best = d; outletNode = n; }
    }
    if (!(best <= options.outlet.radiusM)) {
      throw new RangeError(`the outlet is ${Math.round(best)} m from the nearest line end or junction, beyond the ${options.outlet.radiusM} m snapping radius`);
    }
    outletSnapM = best;
  }
  // where every line at a node is hinted to flow in (or out), the node is a confluence at an outlet
  // (or a split source), not a pass-through point, even with two lines
  const into = (pi: number, n: number) => {
    const h = hint[pieces[pi].line];
    return h === 0 ? 0 : (pieces[pi].to === n) === (h > 0) ? 1 : -1;
  };
  /** +1 where every line at a node of two or more is hinted to flow in (a sink), −1 where all flow out */
  const hintedEnd = new Int8Array(nNodes);
  for (let n = 0; n < nNodes; n++) {
    if (incident[n].length < 2) continue;
    const first = into(incident[n][0], n);
    if (first !== 0 && incident[n].every((pi) => into(pi, n) === first)) hintedEnd[n] = first;
  }
  const isStop = (n: number) => incident[n].length !== 2 || n === outletNode || hintedEnd[n] !== 0;
  const used = new Uint8Array(pieces.length);
  const edges: Edge[] = [];
  const walk = (start: number, first: number): void => {
    const e: Edge = { a: start, b: start, pieces: [], forward: [], lengthM: 0, alive: true };
    let node = start, piece = first;
    for (;;) {
      used[piece] = 1;
      const p = pieces[piece];
      const fwd = p.from === node;
      e.pieces.push(piece);
      e.forward.push(fwd);
      e.lengthM += p.lengthM;
      node = fwd ? p.to : p.from;
      if (isStop(node) || node === start) break;
      const next = incident[node][0] === piece ? incident[node][1] : incident[node][0];
      if (used[next]) break;
      piece = next;
    }
    e.b = node;
    edges.push(e);
  };
  for (let n = 0; n < nNodes; n++) if (isStop(n)) for (const p of incident[n]) if (!used[p]) walk(n, p);
  for (let n = 0; n < nNodes; n++) for (const p of incident[n]) if (!used[p]) walk(n, p); // closed rings of pass-through nodes
  for (const e of edges) {
    if (e.a === e.b) {
      e.alive = false;
      recordLoop(edgePath(e), e.lengthM);
    }
  }
  function recordLoop(path: Float64Array, lengthM: number): void {
    loopCount++;
    loopLength += lengthM;
    if (loopLocations.length < MAX_REPORTED_LOCATIONS) loopLocations.push(midpoint(path, lengthM));
  }
  function midpoint(path: Float64Array, lengthM: number): TopologyLocation {
    const [x, y] = middleVertex(path);
    const [lon, lat] = frame.toLonLat(x, y);
    return { x, y, lon, lat, lengthM };
  }
  function edgePath(e: Edge): Float64Array {
    const out: number[] = [];
    e.pieces.forEach((pi, k) => {
      const path = pieces[pi].path;
      const m = path.length / 2;
      for (let j = out.length === 0 ? 0 : 1; j < m; j++) {
        const v = e.forward[k] ? j : m - 1 - j;
        out.push(path[2 * v], path[2 * v + 1]);
      }
    });
    return Float64Array.from(out);
  }

  // --- 4. dangles ------------------------------------------------------------------------------------
  const degree = new Int32Array(nNodes);
  for (const e of edges) if (e.alive) { degree[e.a]++; degree[e.b]++; }
  let danglesDropped = 0, dangleLength = 0;
  if (dangleLengthM > 0) {
    const before = Int32Array.from(degree);
    for (const e of edges) {
      if (!e.alive || e.lengthM >= dangleLengthM || e.a === outletNode || e.b === outletNode) continue;
      if ((before[e.a] === 1 && before[e.b] >= 3) || (before[e.b] === 1 && before[e.a] >= 3)) {
        e.alive = false;
        degree[e.a]--; degree[e.b]--;
        danglesDropped++;
        dangleLength += e.lengthM;
      }
    }
  }

  // --- 5. components ---------------------------------------------------------------------------------
  const cuf = new UnionFind(nNodes);
  for (const e of edges) if (e.alive) cuf.union(e.a, e.b);
  const compLength = new Map<number, number>();
  for (const e of edges) if (e.alive) compLength.set(cuf.find(e.a), (compLength.get(cuf.find(e.a)) ?? 0) + e.lengthM);
  const compRoots = [...compLength.keys()].sort((a, b) => a - b);
  let analysed = compRoots;
  if (options.components === "largest") {
    // the outlet's component when an outlet is given, otherwise the longest (ties: lowest node id)
    const pick = outletNode >= 0 ? cuf.find(outletNode) : compRoots.reduce((best, c) => (compLength.get(c)! > compLength.get(best)! ? c : best));
    analysed = [pick];
  }
  const analysedSet = new Set(analysed);
  let droppedLength = 0;
  for (const c of compRoots) if (!analysedSet.has(c)) droppedLength += compLength.get(c)!;

  // adjacency of live edges in analysed components
  const adj: number[][] = Array.from({ length: nNodes }, () => []);
  edges.forEach((e, i) => {
    if (e.alive && analysedSet.has(cuf.find(e.a))) { adj[e.a].push(i); adj[e.b].push(i); }
  });
  const other = (e: Edge, n: number) => (e.a === n ? e.b : e.a);
  /** signed count of pieces of `e` whose hint says they flow from `n` to the other end */
  const claimsFrom = (e: Edge, n: number): number => {
    let s = 0;
    e.pieces.forEach((pi, k) => {
      const h = hint[pieces[pi].line];
      if (h !== 0 && (e.forward[k] === (e.a === n)) === (h > 0)) s++;
    });
    return s;
  };

  // --- 6. a root per component -------------------------------------------------------------------------
  const outlets: TopologyReport["outlets"] = [];
  const roots: number[] = [];
  const membersOf = new Map<number, number[]>(analysed.map((c) => [c, []]));
  for (let n = 0; n < nNodes; n++) if (adj[n].length > 0) membersOf.get(cuf.find(n))?.push(n);
  for (const c of analysed) {
    const members = membersOf.get(c)!;
    const terminals = members.filter((n) => adj[n].length === 1 || hintedEnd[n] > 0);
    const candidates = terminals.length > 0 ? terminals : members;
    let root = -1;
    let rule: "point" | "lowest-end" | "digitising" = "digitising";
    if (outletNode >= 0 && cuf.find(outletNode) === c) {
      root = outletNode;
      rule = "point";
    } else if (options.elevationAt) {
      let low = Infinity;
      for (const n of candidates) {
        const z = options.elevationAt(nodeX[n], nodeY[n]);
        if (z < low) { low = z; root = n; }
      }
      if (root >= 0) rule = "lowest-end";
    }
    if (root < 0) root = fewestReversals(members, candidates);
    roots.push(root);
    const [lon, lat] = frame.toLonLat(nodeX[root], nodeY[root]);
    outlets.push({ x: nodeX[root], y: nodeY[root], lon, lat, lengthM: compLength.get(c)!, rule, snapDistanceM: rule === "point" ? outletSnapM : null });
  }
  /** Rerooting over a spanning tree: moving the root across an edge changes the disagreement count by
   *  the claims on that edge, so every candidate is scored in one pass. */
  function fewestReversals(members: number[], candidates: number[]): number {
    const cost = new Map<number, number>();
    const start = members[0];
    const order: number[] = [start];
    const parentEdge = new Map<number, number>([[start, -1]]);
    for (let h = 0; h < order.length; h++) {
      for (const ei of adj[order[h]]) {
        const m = other(edges[ei], order[h]);
        if (!parentEdge.has(m)) { parentEdge.set(m, ei); order.push(m); }
      }
    }
    let base = 0;
    for (const n of order) {
      const ei = parentEdge.get(n)!;
      if (ei >= 0) base += claimsFrom(edges[ei], other(edges[ei], n)); // rooted at start, flow runs n → parent
    }
    cost.set(start, base);
    for (const n of order) {
      const ei = parentEdge.get(n)!;
      if (ei < 0) continue;
      const p = other(edges[ei], n);
      cost.set(n, cost.get(p)! - claimsFrom(edges[ei], p) + claimsFrom(edges[ei], n));
    }
    let best = candidates[0];
    for (const n of candidates) if (cost.get(n)! < cost.get(best)! || (cost.get(n) === cost.get(best) && n < best)) best = n;
    return best;
  }

  // --- 7. shortest flow paths to the outlet; channels on none of them close loops -----------------------
  // ties between equal path lengths go to the edge of lower rank, a rank fixed by geometry, not input order
  const rank = new Int32Array(edges.length);
  edges
    .map((e, i) => ({ i, lo: Math.min(e.a, e.b), hi: Math.max(e.a, e.b), len: e.lengthM, mid: middleVertex(edgePath(e)) }))
    .sort((p, q) => p.lo - q.lo || p.hi - q.hi || p.len - q.len || p.mid[0] - q.mid[0] || p.mid[1] - q.mid[1])
    .forEach((p, r) => { rank[p.i] = r; });
  const isRoot = new Uint8Array(nNodes);
  for (const r of roots) isRoot[r] = 1;
  const dist = new Float64Array(nNodes).fill(Infinity);
  const parentEdge = new Int32Array(nNodes).fill(-1);
  const heap = new MinHeap(nNodes);
  for (const r of roots) { dist[r] = 0; heap.push(r, 0); }
  for (let n = heap.pop(); n >= 0; n = heap.pop()) {
    for (const ei of adj[n]) {
      const m = other(edges[ei], n);
      if (isRoot[m]) continue;
      const d = dist[n] + edges[ei].lengthM;
      if (d < dist[m]) {
        dist[m] = d;
        parentEdge[m] = ei;
        heap.push(m, d);
      } else if (d === dist[m] && rank[ei] < rank[parentEdge[m]]) parentEdge[m] = ei;
    }
  }
  const inTree = new Uint8Array(edges.length);
  for (let n = 0; n < nNodes; n++) if (parentEdge[n] >= 0) inTree[parentEdge[n]] = 1;
  edges.forEach((e, i) => {
    if (e.alive && adj[e.a].length > 0 && analysedSet.has(cuf.find(e.a)) && !inTree[i]) recordLoop(edgePath(e), e.lengthM);
  });

  // --- 8. links: chains of tree edges through nodes with one upstream edge ----------------------------
  const children: number[][] = Array.from({ length: nNodes }, () => []);
  for (let n = 0; n < nNodes; n++) if (parentEdge[n] >= 0) children[other(edges[parentEdge[n]], n)].push(n);
  for (const list of children) list.sort((a, b) => a - b);
  const links: StreamLink[] = [];
  let reversedPieces = 0, attributeConflicts = 0;
  /** The link entered from its downstream end through the node `first`; it extends upstream through
   *  nodes with a single upstream edge. Returns the node at its upstream end (a source or a junction). */
  const buildLink = (first: number, downstream: number): number => {
    const chain: number[] = [];
    let n = first;
    chain.push(n);
    while (children[n].length === 1) {
      n = children[n][0];
      chain.push(n);
    }
    const out: number[] = [];
    let lengthM = 0;
    for (let c = chain.length - 1; c >= 0; c--) {
      const from = chain[c];
      const e = edges[parentEdge[from]];
      const path = edgePath(e);
      const fwd = e.a === from; // the edge path runs a→b; the flow runs from → its parent
      const m = path.length / 2;
      for (let j = out.length === 0 ? 0 : 1; j < m; j++) {
        const v = fwd ? j : m - 1 - j;
        out.push(path[2 * v], path[2 * v + 1]);
      }
      lengthM += e.lengthM;
      e.pieces.forEach((pi, k) => {
        const alongVertexOrder = e.forward[k] === fwd;
        if (!alongVertexOrder) reversedPieces++;
        const h = hint[pieces[pi].line];
        if (h !== 0 && h > 0 !== alongVertexOrder) attributeConflicts++;
      });
    }
    const path = Float64Array.from(out);
    const zUp = options.elevationAt ? options.elevationAt(path[0], path[1]) : NaN;
    const zDown = options.elevationAt ? options.elevationAt(path[path.length - 2], path[path.length - 1]) : NaN;
    links.push({ id: links.length, downstream, path, lengthM, dropM: zUp - zDown, areaM2: NaN });
    return n;
  };
  // breadth first from each outlet, children in node-id order, so ids are fixed by the geometry alone
  for (const r of roots) {
    const queue: { first: number; downstream: number }[] = children[r].map((first) => ({ first, downstream: -1 }));
    for (let h = 0; h < queue.length; h++) {
      const { first, downstream } = queue[h];
      const id = links.length;
      const top = buildLink(first, downstream);
      for (const c of children[top]) queue.push({ first: c, downstream: id });
    }
  }

  let networkLengthM = 0;
  for (const l of links) networkLengthM += l.lengthM;
  const report: TopologyReport = {
    snapToleranceM: tol,
    dangleLengthM,
    lines: lines.length,
    pieces: pieces.length,
    snappedEndpoints,
    midLineJunctions,
    reversedPieces,
    attributeConflicts: options.orientation && options.orientation.kind !== "vertex-order" ? attributeConflicts : null,
    dangles: { dropped: danglesDropped, lengthM: dangleLength },
    loops: { count: loopCount, removedLengthM: loopLength, locations: loopLocations },
    components: { count: compRoots.length, analysed: analysed.length, rule: options.components, droppedLengthM: droppedLength },
    outlets: [...outlets].sort((a, b) => b.lengthM - a.lengthM).slice(0, MAX_REPORTED_LOCATIONS),
    networkLengthM,
  };
  return { network: { links, crs: options.crs }, report };
}

/** The middle vertex of a path, or the mean of the two middle vertices when their number is even. */
function middleVertex(path: Float64Array): [number, number] {
  const m = path.length / 2;
  const a = Math.floor((m - 1) / 2), b = Math.ceil((m - 1) / 2);
  return [(path[2 * a] + path[2 * b]) / 2, (path[2 * a + 1] + path[2 * b + 1]) / 2];
}

/** Per line +1 (vertex order runs downstream), −1 (it runs upstream) or 0 (unknown). */
function orientationSigns(hint: OrientationHint | undefined, nLines: number, pieces: Piece[], nodeOfEnd: Int32Array): Int8Array {
  if (!hint || hint.kind === "vertex-order") return new Int8Array(nLines).fill(1);
  if (hint.kind === "signs") {
    if (hint.signs.length !== nLines) throw new RangeError(`${hint.signs.length} direction signs for ${nLines} lines`);
    return Int8Array.from(hint.signs, Math.sign);
  }
  if (hint.downstreamOf.length !== nLines) throw new RangeError(`${hint.downstreamOf.length} downstream references for ${nLines} lines`);
  const nodesOf: Set<number>[] = Array.from({ length: nLines }, () => new Set());
  for (const p of pieces) { nodesOf[p.line].add(p.from); nodesOf[p.line].add(p.to); }
  const signs = new Int8Array(nLines);
  for (let l = 0; l < nLines; l++) {
    const d = hint.downstreamOf[l];
    if (d < 0 || d >= nLines || d === l) continue;
    // the end this line shares with the line it flows into is its downstream end
    if (nodesOf[d].has(nodeOfEnd[2 * l + 1])) signs[l] = 1;
    else if (nodesOf[d].has(nodeOfEnd[2 * l])) signs[l] = -1;
  }
  return signs;
}

/** Binary min-heap of node ids keyed by distance; stale entries are skipped on pop. */
class MinHeap {
  private ids: Int32Array;
  private keys: Float64Array;
  size = 0;
  private readonly best: Float64Array;
  constructor(n: number) {
    this.ids = new Int32Array(Math.max(16, n));
    this.keys = new Float64Array(Math.max(16, n));
    this.best = new Float64Array(n).fill(Infinity);
  }
  push(id: number, key: number): void {
    if (this.size === this.ids.length) {
      const ids = new Int32Array(this.size * 2); ids.set(this.ids); this.ids = ids;
      const keys = new Float64Array(this.size * 2); keys.set(this.keys); this.keys = keys;
    }
    this.best[id] = key;
    let i = this.size++;
    while (i > 0) {
      const p = (i - 1) >> 1;
      if (this.keys[p] <= key) break;
      this.ids[i] = this.ids[p]; this.keys[i] = this.keys[p];
      i = p;
    }
    this.ids[i] = id; this.keys[i] = key;
  }
  /** the id of least key whose entry is current; call only while size > 0 (returns −1 when only stale entries remain) */
  pop(): number {
    while (this.size > 0) {
      const id = this.ids[0], key = this.keys[0];
      const lastId = this.ids[--this.size], lastKey = this.keys[this.size];
      let i = 0;
      for (;;) {
        const l = 2 * i + 1;
        if (l >= this.size) break;
        const c = l + 1 < this.size && this.keys[l + 1] < this.keys[l] ? l + 1 : l;
        if (this.keys[c] >= lastKey) break;
        this.ids[i] = this.ids[c]; this.keys[i] = this.keys[c];
        i = c;
      }
      this.ids[i] = lastId; this.keys[i] = lastKey;
      if (key === this.best[id]) {
        this.best[id] = -Infinity; // settled
        return id;
      }
    }
    return -1;
  }
}
