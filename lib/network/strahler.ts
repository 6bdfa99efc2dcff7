// Strahler (1952), Geol. Soc. Am. Bull. 63:1117–1142; Strahler (1957), Trans. AGU 38(6):913–920.
import { StreamNetwork, topologicalOrder, upstreamLinks } from "./model";

/** Strahler order of every link: sources are 1; below a junction whose highest inflow order is m the
 *  order is m + 1 when two or more inflows have m, else m. */
export function strahlerOrder(network: StreamNetwork): Int32Array {
  const up = upstreamLinks(network);
  const order = new Int32Array(network.links.length);
  for (const i of topologicalOrder(network)) {
    let highest = 0, timesHighest = 0;
    for (const j of up[i]) {
      if (order[j] > highest) { highest = order[j]; timesHighest = 1; }
      else if (order[j] === highest) timesHighest++;
    }
    order[i] = highest === 0 ? 1 : timesHighest >= 2 ? highest + 1 : highest;
  }
  return order;
}

/** Streams as parallel arrays: stream s has order `order[s]`, runs from link `headLink[s]` down to
 *  link `outletLink[s]`, and sums its links' lengths and drops. */
export interface StrahlerStreams {
  count: number;
  order: Int32Array;
  headLink: Int32Array;
  outletLink: Int32Array;
  linkCount: Int32Array;
  /** length along the flow path, m */
  lengthM: Float64Array;
  /** drop from the head to the outlet of the stream, m (NaN when a link's drop is unknown) */
  dropM: Float64Array;
  /** contributing area at the stream's downstream end, m² */
  areaM2: Float64Array;
  /** the stream each link belongs to */
  streamOfLink: Int32Array;
  /** the Strahler order of each link */
  linkOrder: Int32Array;
}

/** Strahler streams: maximal runs of links of one order. A stream ends where its downstream link has
 *  a higher order or at an outlet; the link of equal order above a junction continues it, and there
 *  is at most one such inflow because two would raise the order. */
export function strahlerStreams(network: StreamNetwork, linkOrder: Int32Array = strahlerOrder(network)): StrahlerStreams {
  const { links } = network;
  const n = links.length;
  if (linkOrder.length !== n) throw new RangeError(`linkOrder has ${linkOrder.length} values for ${n} links`);
  const streamOfLink = new Int32Array(n).fill(-1);
  let count = 0;
  for (let i = 0; i < n; i++) {
    const d = links[i].downstream;
    if (d < 0 || linkOrder[d] !== linkOrder[i]) streamOfLink[i] = count++;
  }
  const order = new Int32Array(count), headLink = new Int32Array(count), outletLink = new Int32Array(count);
  const linkCount = new Int32Array(count);
  const lengthM = new Float64Array(count), dropM = new Float64Array(count), areaM2 = new Float64Array(count);
  for (let i = 0; i < n; i++) {
    const s = streamOfLink[i];
    if (s >= 0) { outletLink[s] = i; order[s] = linkOrder[i]; areaM2[s] = links[i].areaM2; }
  }
  // Sources first: walking the order in reverse gives every link after the link it flows into, so
  // each link inherits the stream of its downstream link of equal order.
  const topo = topologicalOrder(network);
  for (let t = n - 1; t >= 0; t--) {
    const i = topo[t];
    if (streamOfLink[i] < 0) streamOfLink[i] = streamOfLink[links[i].downstream];
    const s = streamOfLink[i];
    linkCount[s]++;
    lengthM[s] += links[i].lengthM;
    dropM[s] += links[i].dropM;
    headLink[s] = i; // the last link of a stream seen in this walk is its most upstream one
  }
  return { count, order, headLink, outletLink, linkCount, lengthM, dropM, areaM2, streamOfLink, linkOrder };
}
