// Shreve (1966), Statistical law of stream numbers, J. Geol. 74(1):17–37: magnitude = number of sources upstream.
import { StreamNetwork, topologicalOrder, upstreamLinks } from "./model";

/** Shreve magnitude of every link: 1 at a source, the sum of the inflows' magnitudes below a junction. */
export function shreveMagnitude(network: StreamNetwork): Float64Array {
  const up = upstreamLinks(network);
  // Float64: magnitudes of continental networks can pass 2^31 in principle and stay exact up to 2^53
  const magnitude = new Float64Array(network.links.length);
  for (const i of topologicalOrder(network)) {
    let m = 0;
    for (const j of up[i]) m += magnitude[j];
    magnitude[i] = m === 0 ? 1 : m;
  }
  return magnitude;
}
