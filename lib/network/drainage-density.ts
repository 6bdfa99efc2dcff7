// Horton (1945), Geol. Soc. Am. Bull. 56(3):275–370: drainage density = total channel length / basin area.
import { StreamNetwork } from "./model";
import { M2_PER_KM2, M_PER_KM } from "./units";

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
  const lengthKm = lengthM / M_PER_KM, areaKm2 = areaM2 / M2_PER_KM2;
  return { valuePerKm: lengthKm / areaKm2, totalLengthKm: lengthKm, basinAreaKm2: areaKm2, outlets };
}
