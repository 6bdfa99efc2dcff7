// Hand-made networks shared by the network tests (not a test file itself).
import { StreamNetwork } from "@/lib/network/model";

/** A network from downstream pointers; every link 1 m long unless `lengths` says otherwise. */
export function networkFromPointers(downstream: number[], lengths?: number[], drops?: number[], areas?: number[]): StreamNetwork {
  return {
    crs: "+proj=eqc +units=m +no_defs",
    links: downstream.map((d, id) => ({
      id, downstream: d, path: Float64Array.of(0, 0, 0, 0),
      lengthM: lengths?.[id] ?? 1, dropM: drops?.[id] ?? NaN, areaM2: areas?.[id] ?? NaN,
    })),
  };
}

/** Ten links: sources 3, 4 → 1 → 0 (with sources 2 and 5 joining 0 in one triple junction);
 *  sources 6, 7 → 8; 0 and 8 → 9, the outlet. Strahler: 1,1,1,1,1,1 at 2–7; 2 at 0, 1, 8; 3 at 9. */
export const TEN_LINKS = [9, 0, 0, 1, 1, 0, 8, 8, 9, -1];
