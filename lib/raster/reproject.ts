// Grid coordinates to lon/lat (WGS 84) with proj4js (Evenden's PROJ.4 cartographic projections, ported to JavaScript).
import proj4 from "proj4";
import type { CrsInfo } from "@/lib/raster/crs";

const LONLAT = "+proj=longlat +datum=WGS84 +no_defs";

/** A function from CRS coordinates (x, y) to [lon, lat] in degrees, in GeoJSON's axis order (RFC 7946). */
export function lonLatTransformer(crs: CrsInfo): (x: number, y: number) => [number, number] {
  if (crs.geographic && /\+datum=WGS84\b/.test(crs.proj4)) return (x, y) => [x, y];
  // named datum-shift grids are not bundled with proj4js: mark them optional ("@") so the
  // conversion falls back to the ellipsoid parameters instead of failing (a metre-level shift)
  const definition = crs.proj4.replace(/\+nadgrids=([^@\s][^\s]*)/, (_m, grids: string) =>
    `+nadgrids=${grids.split(",").map((g) => (g.startsWith("@") ? g : `@${g}`)).join(",")}`);
  const converter = proj4(definition, LONLAT);
  return (x, y) => {
    const [lon, lat] = converter.forward([x, y]);
    return [lon, lat];
  };
}
