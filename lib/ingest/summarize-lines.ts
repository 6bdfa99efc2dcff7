// Dataset metadata of a set of vector lines: counts, CRS and the lon/lat bounding box (RFC 7946 §5 bbox order
// west, south, east, north), for the check made before a network upload is accepted.
import type { CrsInfo } from "@/lib/raster/crs";
import { lonLatTransformer } from "@/lib/raster/reproject";
import type { VectorLines } from "@/lib/vector/read-geojson";
import { VectorError } from "@/lib/vector/vector-error";

export interface LinesSummary {
  /** Features in the file, with or without a usable line. */
  featureCount: number;
  /** Polylines read (a MultiLineString gives one per part). */
  lineCount: number;
  vertexCount: number;
  crs: { epsg: number | null; name: string; geographic: boolean };
  /** [west, south, east, north] in degrees (WGS 84); the antimeridian is not handled. */
  bboxLonLat: [number, number, number, number];
  skipped: VectorLines["skipped"];
}

export function summarizeLines(vector: VectorLines, crs: CrsInfo): LinesSummary {
  if (vector.lines.length === 0) throw new VectorError("no_lines", "the file holds no line with two distinct positions");
  const toLonLat = lonLatTransformer(crs);
  let west = Infinity, south = Infinity, east = -Infinity, north = -Infinity, vertexCount = 0;
  for (const line of vector.lines) {
    vertexCount += line.length / 2;
    for (let i = 0; i < line.length; i += 2) {
      const [lon, lat] = toLonLat(line[i], line[i + 1]);
      if (lon < west) west = lon;
      if (lon > east) east = lon;
      if (lat < south) south = lat;
      if (lat > north) north = lat;
    }
  }
  if (!(west <= east && south <= north)) {
    throw new VectorError("bad_geometry", `the coordinates do not convert to longitude/latitude in ${crs.name}`);
  }
  return {
    featureCount: vector.properties.length,
    lineCount: vector.lines.length,
    vertexCount,
    crs: { epsg: crs.epsg, name: crs.name, geographic: crs.geographic },
    bboxLonLat: [west, south, east, north],
    skipped: vector.skipped,
  };
}
