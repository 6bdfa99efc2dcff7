// Grid coordinates to lon/lat (WGS 84) with proj4js (Evenden's PROJ.4 cartographic projections, ported to JavaScript).
import proj4 from "proj4";
import type { CrsInfo } from "@/lib/raster/crs";

const LONLAT = "+proj=longlat +datum=WGS84 +no_defs";

/** A function from CRS coordinates (x, y) to [lon, lat] in degrees, in GeoJSON's axis order (RFC 7946). */
export function lonLatTransformer(crs: CrsInfo): (x: number, y: number) => [number, number] {
  if (crs.geographic && /\+datum=WGS84\b/.test(crs.proj4)) return (x, y) => [x, y];
  // Datum-shift grid files are not bundled with proj4js, which then prints a warning and returns
  // NaN even for "optional" grids; without the grid the conversion uses the ellipsoid alone, off by
  // the datum shift (about 100 m for OSGB36, under 2 m for NAD83) — fine for display, not for survey.
  const definition = crs.proj4.replace(/\+nadgrids=(?!@null\b)\S+/, "");
  const converter = proj4(definition, LONLAT);
  return (x, y) => {
    const [lon, lat] = converter.forward([x, y]);
    return [lon, lat];
  };
}
