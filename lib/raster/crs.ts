// GeoTIFF 1.1 (OGC 19-008r4) GeoKeys to a coordinate reference system, resolved through the EPSG
// registry as packaged by epsg-index (proj4 definitions); unit codes from the EPSG dataset (9001–9003).
import { createRequire } from "node:module";
import { RasterError } from "@/lib/raster/errors";

export interface CrsInfo {
  epsg: number | null;
  name: string;
  proj4: string;
  geographic: boolean;
  /** metres per horizontal CRS unit; NaN for a geographic CRS, whose unit is the degree */
  linearUnitToMetre: number;
}

export const GEOKEY = {
  GTModelType: 1024,
  GTRasterType: 1025,
  GeographicType: 2048,
  ProjectedCSType: 3072,
  ProjLinearUnits: 3076,
  VerticalCSType: 4096,
  VerticalUnits: 4099,
} as const;

/** GeoTIFF's "user-defined" code: the CRS is described by parameters, not by an EPSG code. */
const USER_DEFINED = 32767;
const MODEL_PROJECTED = 1;
const MODEL_GEOGRAPHIC = 2;

/** EPSG unit-of-measure codes → metres (EPSG dataset: 9001 metre, 9002 foot, 9003 US survey foot, 9036 kilometre). */
const EPSG_UNIT_TO_METRE: Record<number, number> = { 9001: 1, 9002: 0.3048, 9003: 1200 / 3937, 9036: 1000 };
/** proj4 `+units=` names → metres (same definitions as above). */
const PROJ_UNIT_TO_METRE: Record<string, number> = { m: 1, km: 1000, ft: 0.3048, "us-ft": 1200 / 3937 };

const HOW_TO_SUPPLY = "give the EPSG code of the grid's CRS with the `epsg` option";

type GeoKeyValue = number | number[] | string;

/** Parses the GeoKeyDirectory (tag 34735) with its double (34736) and ASCII (34737) parameter tags. */
export function parseGeoKeys(directory: number[], doubles: number[] = [], ascii = ""): Map<number, GeoKeyValue> {
  const keys = new Map<number, GeoKeyValue>();
  const count = directory[3] ?? 0;
  for (let k = 0; k < count && 4 + 4 * k + 3 < directory.length; k++) {
    const [id, location, n, offset] = directory.slice(4 + 4 * k, 8 + 4 * k);
    if (location === 0) keys.set(id, offset);
    else if (location === 34736) keys.set(id, n === 1 ? doubles[offset] : doubles.slice(offset, offset + n));
    else if (location === 34737) keys.set(id, ascii.slice(offset, offset + n).replace(/\|$/, ""));
    else if (location === 34735) keys.set(id, directory.slice(offset, offset + n));
  }
  return keys;
}

interface EpsgEntry { code: string; kind: string; name: string; proj4: string }
const requireJson = createRequire(import.meta.url);

/** The CRS of an EPSG code, from the packaged registry. */
export function crsFromEpsg(code: number): CrsInfo {
  if (!Number.isInteger(code) || code <= 0 || code >= 1_000_000) {
    throw new RasterError("crs-unknown", `EPSG code ${code} is not a valid code`);
  }
  let entry: EpsgEntry;
  try {
    entry = requireJson(`epsg-index/s/${code}.json`) as EpsgEntry;
  } catch {
    throw new RasterError("crs-unknown", `EPSG:${code} is not in the EPSG index; ${HOW_TO_SUPPLY}`);
  }
  const geographic = entry.kind === "CRS-GEOGCRS";
  if (!geographic && entry.kind !== "CRS-PROJCRS") {
    throw new RasterError("crs-unknown", `EPSG:${code} (${entry.name}) is a ${entry.kind.replace("CRS-", "").toLowerCase()}, not a horizontal CRS`);
  }
  if (!entry.proj4) throw new RasterError("crs-unknown", `EPSG:${code} (${entry.name}) has no proj4 definition`);
  return { epsg: code, name: entry.name, proj4: entry.proj4, geographic, linearUnitToMetre: geographic ? NaN : projUnitToMetre(entry.proj4, code) };
}

function projUnitToMetre(proj4: string, code: number): number {
  const toMeter = /\+to_meter=([0-9.eE+-]+)/.exec(proj4);
  if (toMeter) return Number(toMeter[1]);
  const units = /\+units=(\S+)/.exec(proj4)?.[1] ?? "m";
  const factor = PROJ_UNIT_TO_METRE[units];
  if (factor === undefined) throw new RasterError("crs-unknown", `EPSG:${code} uses the unit "${units}", which we do not convert`);
  return factor;
}

/** The CRS named by the GeoKeys; `epsg` (from the caller) overrides or supplies it. */
export function crsFromGeoKeys(keys: Map<number, GeoKeyValue> | null, epsg?: number): CrsInfo {
  if (epsg !== undefined) return crsFromEpsg(epsg);
  if (!keys || keys.size === 0) throw new RasterError("crs-missing", `the file has no GeoKeys, so its CRS is unknown; ${HOW_TO_SUPPLY}`);
  const model = keys.get(GEOKEY.GTModelType);
  const projected = keys.get(GEOKEY.ProjectedCSType);
  const geographicType = keys.get(GEOKEY.GeographicType);
  if (model === MODEL_PROJECTED || (model === undefined && projected !== undefined)) {
    if (typeof projected !== "number") {
      throw new RasterError("crs-missing", `the GeoKeys say "projected" but give no ProjectedCSTypeGeoKey (3072); ${HOW_TO_SUPPLY}`);
    }
    if (projected === USER_DEFINED) {
      throw new RasterError("crs-unknown", `the projected CRS is user-defined (ProjectedCSTypeGeoKey = 32767), with no EPSG code; ${HOW_TO_SUPPLY}`);
    }
    const crs = crsFromEpsg(projected);
    const unit = keys.get(GEOKEY.ProjLinearUnits);
    // the EPSG definition fixes the unit; a contradicting ProjLinearUnitsGeoKey means a broken file
    if (typeof unit === "number" && EPSG_UNIT_TO_METRE[unit] !== undefined && Math.abs(EPSG_UNIT_TO_METRE[unit] - crs.linearUnitToMetre) > 1e-9) {
      throw new RasterError("crs-unknown", `ProjLinearUnitsGeoKey ${unit} contradicts the unit of EPSG:${projected}; ${HOW_TO_SUPPLY}`);
    }
    return crs;
  }
  if (model === MODEL_GEOGRAPHIC || (model === undefined && geographicType !== undefined)) {
    if (typeof geographicType !== "number") {
      throw new RasterError("crs-missing", `the GeoKeys say "geographic" but give no GeographicTypeGeoKey (2048); ${HOW_TO_SUPPLY}`);
    }
    if (geographicType === USER_DEFINED) {
      throw new RasterError("crs-unknown", `the geographic CRS is user-defined (GeographicTypeGeoKey = 32767), with no EPSG code; ${HOW_TO_SUPPLY}`);
    }
    return crsFromEpsg(geographicType);
  }
  if (model === undefined) throw new RasterError("crs-missing", `the GeoKeys name no CRS; ${HOW_TO_SUPPLY}`);
  throw new RasterError("unsupported", `GTModelTypeGeoKey ${String(model)} (only projected = 1 and geographic = 2 grids are read)`);
}

/** Metres per unit of the elevations: from VerticalUnitsGeoKey (4099), else from the unit of the EPSG
 *  vertical CRS in VerticalCSTypeGeoKey (4096; GDAL writes only this one); metres when neither is given. */
export function verticalUnitToMetre(keys: Map<number, GeoKeyValue> | null): number {
  const unit = keys?.get(GEOKEY.VerticalUnits);
  if (unit !== undefined && unit !== USER_DEFINED) {
    const factor = typeof unit === "number" ? EPSG_UNIT_TO_METRE[unit] : undefined;
    if (factor === undefined) throw new RasterError("unsupported", `vertical unit code ${String(unit)} (metre 9001, foot 9002 and US survey foot 9003 are converted)`);
    return factor;
  }
  const vertical = keys?.get(GEOKEY.VerticalCSType);
  if (typeof vertical !== "number" || vertical === USER_DEFINED) return 1;
  let entry: EpsgEntry;
  try {
    entry = requireJson(`epsg-index/s/${vertical}.json`) as EpsgEntry;
  } catch {
    throw new RasterError("crs-unknown", `vertical CRS EPSG:${vertical} is not in the EPSG index`);
  }
  if (entry.kind !== "CRS-VERTCRS") throw new RasterError("crs-unknown", `EPSG:${vertical} (${entry.name}) is not a vertical CRS`);
  if (/depth/i.test(entry.name)) throw new RasterError("unsupported", `vertical CRS EPSG:${vertical} (${entry.name}) measures depth, positive down`);
  const vunits = /\+vunits=(\S+)/.exec(entry.proj4)?.[1] ?? "m";
  const factor = PROJ_UNIT_TO_METRE[vunits];
  if (factor === undefined) throw new RasterError("unsupported", `vertical CRS EPSG:${vertical} uses the unit "${vunits}"`);
  return factor;
}
