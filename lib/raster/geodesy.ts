// Geodesic distances on the WGS84 ellipsoid by Karney (2013), J. Geod. 87:43–55, through geographiclib-geodesic.
import geodesicModule from "geographiclib-geodesic";

const { Geodesic } = geodesicModule as unknown as {
  Geodesic: { WGS84: { Inverse(lat1: number, lon1: number, lat2: number, lon2: number, mask?: number): { s12?: number } }; DISTANCE: number };
};
const wgs84 = Geodesic.WGS84;

/** Geodesic distance in metres between two lon/lat points (degrees). */
export function geodesicDistance(lon1: number, lat1: number, lon2: number, lat2: number): number {
  return wgs84.Inverse(lat1, lon1, lat2, lon2, Geodesic.DISTANCE).s12 ?? NaN;
}
