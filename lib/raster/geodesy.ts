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

const { PolygonArea } = geodesicModule as unknown as {
  PolygonArea: { PolygonArea: new (geod: unknown, polyline?: boolean) => { AddPoint(lat: number, lon: number): void; Compute(reverse: boolean, sign: boolean): { area?: number } } };
};

/** Area in m² enclosed by a ring of lon/lat vertices (degrees, x,y interleaved; closing vertex optional),
 *  whatever its winding; edges are geodesics (Karney 2013, §6). */
export function geodesicRingArea(ring: Float64Array): number {
  const polygon = new PolygonArea.PolygonArea(wgs84, false);
  let n = ring.length / 2;
  if (n > 1 && ring[0] === ring[2 * n - 2] && ring[1] === ring[2 * n - 1]) n--;
  for (let i = 0; i < n; i++) polygon.AddPoint(ring[2 * i + 1], ring[2 * i]);
  return Math.abs(polygon.Compute(false, true).area ?? NaN);
}
