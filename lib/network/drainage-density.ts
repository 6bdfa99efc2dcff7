// Horton (1945), Geol. Soc. Am. Bull. 56(3):275–370: drainage density = total channel length / basin area.
import { StreamNetwork } from "./model";

export interface DrainageDensity {
  /** km of channel per km² of basin */
  valuePerKm: number;
  totalLengthKm: number;
  /** area draining to the network's outlets, km² */
  basinAreaKm2: number;
  outlets: number;
}

/** Over the basins of all outlets of the network; the basin area is the outlets' contributing area. */
export function drainageDensity(network: StreamNetwork): DrainageDensity {
  let lengthM = 0, areaM2 = 0, outlets = 0;
  for (const link of network.links) {
    lengthM += link.lengthM;
    if (link.downstream < 0) { areaM2 += link.areaM2; outlets++; }
  }
  if (!(areaM2 > 0)) throw new RangeError("drainage density needs the outlets' contributing areas (none known)");
  return { valuePerKm: lengthM / 1000 / (areaM2 / 1e6), totalLengthKm: lengthM / 1000, basinAreaKm2: areaM2 / 1e6, outlets };
}
