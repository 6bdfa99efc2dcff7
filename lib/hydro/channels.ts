// Channel cells by a contributing-area threshold (O'Callaghan & Mark 1984, CVGIP 28(3):323–344): a cell belongs to a channel where the area draining through it reaches the threshold.

/** m² in one km² */
export const M2_PER_KM2 = 1e6;

/** A threshold given in km², in m² (the unit `channelMask` takes). */
export function km2ToM2(km2: number): number {
  if (!(km2 > 0) || !Number.isFinite(km2)) throw new RangeError(`area threshold must be a positive number of km², got ${km2}`);
  return km2 * M2_PER_KM2;
}

/** 1 where the contributing area reaches `thresholdM2` (area ≥ threshold), else 0. Nodata cells have
 *  area 0 and so are never channels. */
export function channelMask(areaM2: Float64Array | Float32Array, thresholdM2: number): Uint8Array {
  if (!(thresholdM2 > 0) || !Number.isFinite(thresholdM2)) {
    throw new RangeError(`area threshold must be a positive number of m², got ${thresholdM2}`);
  }
  const mask = new Uint8Array(areaM2.length);
  for (let i = 0; i < areaM2.length; i++) if (areaM2[i] >= thresholdM2) mask[i] = 1;
  return mask;
}
