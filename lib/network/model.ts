// The one stream-network model that both paths produce: links from a D8 grid (from-raster) and
// topology built from mapped lines (from-lines). Strahler, Shreve, Horton, Hack and Tokunaga read only this.

/** A link runs from a source or junction down to the next junction or an outlet. */
export interface StreamLink {
  /** index of this link in `StreamNetwork.links` */
  id: number;
  /** index of the link it flows into; -1 at an outlet */
  downstream: number;
  /** vertices from the upstream end to the downstream end, interleaved x0,y0,x1,y1,… in `crs` units */
  path: Float64Array;
  /** length along the flow path, m (geodesic on geographic coordinates) */
  lengthM: number;
  /** elevation drop from the upstream to the downstream end, m; NaN when no elevations are known */
  dropM: number;
  /** contributing area at the downstream end, m²; NaN when unknown (mapped lines without a DEM) */
  areaM2: number;
  /** longest flow path from the divide to the downstream end, m, where a DEM gives it (from-raster);
   *  absent otherwise, and Hack's law then measures the main stream along the links from the sources */
  mainStreamLengthM?: number;
}

export interface StreamNetwork {
  links: StreamLink[];
  /** proj4 definition of the path coordinates */
  crs: string;
}

/** Upstream neighbours of every link, built once from the `downstream` pointers. */
export function upstreamLinks(network: StreamNetwork): number[][] {
  const up: number[][] = network.links.map(() => []);
  for (const link of network.links) {
    if (link.downstream >= 0) up[link.downstream].push(link.id);
  }
  return up;
}

/** Links ordered so that every link comes after all links upstream of it (sources first).
 *  Throws when the downstream pointers form a cycle, which a drainage tree cannot have. */
export function topologicalOrder(network: StreamNetwork): Int32Array {
  const n = network.links.length;
  const pending = new Int32Array(n);
  for (const link of network.links) {
    if (link.downstream >= n || link.downstream < -1) {
      throw new RangeError(`link ${link.id} flows into link ${link.downstream}, which does not exist`);
    }
    if (link.downstream >= 0) pending[link.downstream]++;
  }
  const order = new Int32Array(n);
  let head = 0, tail = 0;
  for (let i = 0; i < n; i++) if (pending[i] === 0) order[tail++] = i;
  while (head < tail) {
    const d = network.links[order[head++]].downstream;
    if (d >= 0 && --pending[d] === 0) order[tail++] = d;
  }
  if (tail !== n) throw new RangeError(`the network has a cycle through ${n - tail} links; a drainage tree cannot`);
  return order;
}
