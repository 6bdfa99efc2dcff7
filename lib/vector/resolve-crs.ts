// The CRS of mapped lines: RFC 7946 §4 (WGS 84 longitude/latitude unless stated), the 2008 GeoJSON `crs`
// member, a Shapefile's .prj WKT (parsed by proj4) or a caller's EPSG code, resolved by lib/raster/crs.
import proj4 from "proj4";
import { crsFromEpsg, type CrsInfo } from "@/lib/raster/crs";
import { RasterError } from "@/lib/raster/errors";
import type { CrsSource } from "./read-geojson";
import { VectorError } from "./vector-error";

const ASK_FOR_EPSG = "give the EPSG code of the lines' CRS with the `epsg` parameter";
/** urn:ogc:def:crs:EPSG::32632, EPSG:32632, http://www.opengis.net/def/crs/EPSG/0/32632 */
const EPSG_NAME = /EPSG(?::{1,2}|\/\d+\/)(\d+)$/i;
const CRS84_NAME = /(OGC:1\.3:CRS84|OGC:CRS84|OGC\/1\.3\/CRS84)$/i;
const WGS84_EPSG = 4326;

function fromEpsg(code: number): CrsInfo {
  try {
    return crsFromEpsg(code);
  } catch (e) {
    if (e instanceof RasterError) throw new VectorError("crs_unknown", e.detail);
    throw e;
  }
}

function fromWkt(wkt: string): CrsInfo {
  let proj: { projName?: string; to_meter?: number };
  try {
    proj = proj4.Proj(wkt) as unknown as typeof proj;
  } catch (e) {
    throw new VectorError("crs_unknown", `the .prj WKT cannot be parsed (${(e as Error).message}); ${ASK_FOR_EPSG}`);
  }
  if (!proj.projName) throw new VectorError("crs_unknown", `the .prj WKT names no projection proj4 knows; ${ASK_FOR_EPSG}`);
  const geographic = proj.projName === "longlat";
  const name = /^\s*\w+\[\s*"([^"]*)"/.exec(wkt)?.[1] ?? "from .prj";
  return { epsg: null, name, proj4: wkt, geographic, linearUnitToMetre: geographic ? NaN : proj.to_meter ?? 1 };
}

/**
 * The CRS the lines are in. A given `epsg` overrides what the file says. Lines without any CRS, and
 * RFC 7946 lines whose coordinates cannot be longitude/latitude, are refused with a request for `epsg`.
 */
export function resolveLinesCrs(source: CrsSource, lines: Float64Array[], epsg?: number): CrsInfo {
  if (epsg !== undefined) return fromEpsg(epsg);
  switch (source.kind) {
    case "epsg-parameter":
      return fromEpsg(source.epsg);
    case "prj":
      return fromWkt(source.wkt);
    case "crs-member": {
      const code = EPSG_NAME.exec(source.name);
      if (code) return fromEpsg(Number(code[1]));
      if (CRS84_NAME.test(source.name)) return fromEpsg(WGS84_EPSG);
      throw new VectorError("crs_unknown", `the crs member names ${JSON.stringify(source.name)}, which is not an EPSG code; ${ASK_FOR_EPSG}`);
    }
    case "none":
      throw new VectorError("crs_missing", `the file states no CRS (no .prj); ${ASK_FOR_EPSG}`);
    case "rfc7946": {
      for (const l of lines) {
        for (let i = 0; i < l.length; i += 2) {
          if (Math.abs(l[i]) > 180 || Math.abs(l[i + 1]) > 90) {
            throw new VectorError("crs_missing", `position (${l[i]}, ${l[i + 1]}) is not longitude/latitude as RFC 7946 requires, and the file states no CRS; ${ASK_FOR_EPSG}`);
          }
        }
      }
      return fromEpsg(WGS84_EPSG);
    }
  }
}
