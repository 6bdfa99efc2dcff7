// Total channel length upstream: the quantity Horton (1945), Geol. Soc. Am. Bull. 56(3):275–370, divides by
// basin area to define drainage density; with a uniform density it is proportional to contributing area.
import { StreamNetwork, topologicalOrder, upstreamLinks } from "./model";

/** Length of all links upstream of each link's downstream end, including the link itself, m. */
export function upstreamLength(network: StreamNetwork): Float64Array {
  const up = upstreamLinks(network);
  const total = new Float64Array(network.links.length);
  for (const i of topologicalOrder(network)) {
    let sum = network.links[i].lengthM;
    for (const j of up[i]) sum += total[j];
    total[i] = sum;
  }
  return total;
}
