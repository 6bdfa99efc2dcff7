// Shared construction of the synthetic test networks (Tokunaga trees, Peano basin, binary tree): straight
// links in a local metric plane and areas from a uniform drainage density (Horton 1945, GSA Bull. 56(3)).
import { StreamLink, StreamNetwork } from "@/lib/network/model";
import { upstreamLength } from "@/lib/network/upstream-length";

/** Plate carrée on WGS84 in metres: near the origin it is a plain metric plane, and proj4 can still
 *  take the toy networks to lon/lat for a map. */
export const SYNTHETIC_CRS = "+proj=eqc +lat_ts=0 +lat_0=0 +lon_0=0 +x_0=0 +y_0=0 +datum=WGS84 +units=m +no_defs";

/** Width that turns upstream channel length into area (1/drainage density): 1 m, so the area of a
 *  sub-basin in m² is the length of channel above its outlet in m. This is the area under which the
 *  Tokunaga (1, 2) tree of order 5 gives R_A = 4.261827 (METHODS.md). */
export const SYNTHETIC_AREA_PER_LENGTH_M = 1;

/** Collects links; `add` takes the upstream and downstream end and the link it flows into. */
export class SyntheticNetworkBuilder {
  readonly links: StreamLink[] = [];

  add(x0: number, y0: number, x1: number, y1: number, downstream: number, lengthM = Math.hypot(x1 - x0, y1 - y0)): number {
    const id = this.links.length;
    this.links.push({ id, downstream, path: Float64Array.of(x0, y0, x1, y1), lengthM, dropM: NaN, areaM2: NaN });
    return id;
  }

  /** The network with every link's area set from the channel length above its downstream end. */
  build(): StreamNetwork {
    const network: StreamNetwork = { links: this.links, crs: SYNTHETIC_CRS };
    const length = upstreamLength(network);
    for (const link of this.links) link.areaM2 = length[link.id] * SYNTHETIC_AREA_PER_LENGTH_M;
    return network;
  }
}
