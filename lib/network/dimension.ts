// Tarboton, Bras & Rodríguez-Iturbe (1988), WRR 24(8):1317–1322; La Barbera & Rosso (1989), WRR 25(4):735–741:
// network fractal dimension D = ln R_B / ln R_L, bounded to [1, 2] because a planar network cannot exceed 2.

/** Bounds of the dimension of a network drawn in a plane: a line (1) and the plane itself (2). */
export const NETWORK_DIMENSION_MIN = 1;
export const NETWORK_DIMENSION_MAX = 2;

export interface NetworkDimension {
  /** ln R_B / ln R_L as computed, dimensionless */
  raw: number;
  /** raw clamped to [1, 2] */
  bounded: number;
  /** true when the bound changed the value */
  clamped: boolean;
  bifurcationRatio: number;
  lengthRatio: number;
}

export function networkDimension(bifurcationRatio: number, lengthRatio: number): NetworkDimension {
  if (!(bifurcationRatio > 0)) throw new RangeError(`R_B must be positive, got ${bifurcationRatio}`);
  if (!(lengthRatio > 1)) throw new RangeError(`R_L must exceed 1 for ln R_L > 0, got ${lengthRatio}`);
  const raw = Math.log(bifurcationRatio) / Math.log(lengthRatio);
  const bounded = Math.min(NETWORK_DIMENSION_MAX, Math.max(NETWORK_DIMENSION_MIN, raw));
  return { raw, bounded, clamped: bounded !== raw, bifurcationRatio, lengthRatio };
}
