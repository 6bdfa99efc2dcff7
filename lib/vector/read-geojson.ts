// GeoJSON reading after Butler et al. (2016), RFC 7946 "The GeoJSON Format" (IETF); the `crs` member of
// the 2008 GeoJSON specification (Butler et al., geojson.org) is honoured when an older file carries it.
import { MAX_COORDINATES, MAX_GEOJSON_BYTES, MAX_JSON_DEPTH } from "./limits";
import { VectorError } from "./vector-error";

/** Where the CRS of a set of lines came from. */
export type CrsSource =
  | { kind: "rfc7946" }
  | { kind: "crs-member"; name: string }
  | { kind: "epsg-parameter"; epsg: number }
  | { kind: "prj"; wkt: string }
  | { kind: "none" };

export interface VectorLines {
  /** one polyline per LineString or MultiLineString part, x,y interleaved, in the CRS's units */
  lines: Float64Array[];
  /** index of the feature each line came from */
  featureOf: Int32Array;
  /** properties of each feature, by feature index */
  properties: (Record<string, unknown> | null)[];
  /** how to find the CRS: resolved into a proj4 definition by the caller (lib/raster/crs) */
  crs: CrsSource;
  /** features without geometry and lines with fewer than two distinct positions, skipped */
  skipped: { nullGeometry: number; degenerateLines: number };
}

export interface ReadLimits {
  maxDepth: number;
  maxCoordinates: number;
}

const DEFAULT_LIMITS: ReadLimits = { maxDepth: MAX_JSON_DEPTH, maxCoordinates: MAX_COORDINATES };

const QUOTE = 0x22, BACKSLASH = 0x5c, OPEN_BRACE = 0x7b, CLOSE_BRACE = 0x7d, OPEN_BRACKET = 0x5b, CLOSE_BRACKET = 0x5d;

/** Refuses JSON text nested deeper than `maxDepth` with one linear scan, before JSON.parse can recurse. */
export function checkJsonDepth(text: string, maxDepth: number = MAX_JSON_DEPTH): void {
  let depth = 0;
  let inString = false;
  for (let i = 0; i < text.length; i++) {
    const c = text.charCodeAt(i);
    if (inString) {
      if (c === BACKSLASH) i++;
      else if (c === QUOTE) inString = false;
    } else if (c === QUOTE) inString = true;
    else if (c === OPEN_BRACE || c === OPEN_BRACKET) {
      if (++depth > maxDepth) {
        throw new VectorError("too_deep", `the JSON is nested deeper than ${maxDepth} levels (at character ${i})`);
      }
    } else if (c === CLOSE_BRACE || c === CLOSE_BRACKET) depth--;
  }
}

/** Parses GeoJSON text after the size and depth checks; a syntax error becomes a VectorError. */
export function parseGeoJsonText(text: string, maxDepth: number = MAX_JSON_DEPTH): unknown {
  if (text.length > MAX_GEOJSON_BYTES) {
    throw new VectorError("file_too_large", `the GeoJSON text is ${text.length} characters; at most ${MAX_GEOJSON_BYTES} are accepted`);
  }
  checkJsonDepth(text, maxDepth);
  try {
    return JSON.parse(text);
  } catch (e) {
    throw new VectorError("not_json", `the file is not valid JSON (${(e as Error).message})`);
  }
}

const isObject = (v: unknown): v is Record<string, unknown> => typeof v === "object" && v !== null && !Array.isArray(v);

/** Reads the lines of an RFC 7946 FeatureCollection (a single Feature is accepted too). */
export function readGeoJson(doc: unknown, limits: Partial<ReadLimits> = {}): VectorLines {
  const lim = { ...DEFAULT_LIMITS, ...limits };
  if (!isObject(doc)) throw new VectorError("not_feature_collection", "the document is not a GeoJSON object");
  const features = doc.type === "FeatureCollection" ? doc.features : doc.type === "Feature" ? [doc] : undefined;
  if (!Array.isArray(features)) {
    throw new VectorError("not_feature_collection", `expected a FeatureCollection of lines, got type ${JSON.stringify(doc.type)}`);
  }
  const crs = doc.crs === undefined || doc.crs === null ? { kind: "rfc7946" as const } : crsMember(doc.crs);
  return linesFromFeatures(features, crs, lim);
}

function crsMember(crs: unknown): CrsSource {
  const name = isObject(crs) && crs.type === "name" && isObject(crs.properties) ? crs.properties.name : undefined;
  if (typeof name !== "string") {
    throw new VectorError("crs_unknown", "the crs member is not a named CRS ({type: \"name\", properties: {name}}); remove it or give the epsg parameter");
  }
  return { kind: "crs-member", name };
}

/**
 * Walks features whose geometries must be LineString or MultiLineString. The walk descends only the
 * fixed depth these geometries have (so it cannot recurse on hostile input) and counts positions.
 */
export function linesFromFeatures(features: unknown[], crs: CrsSource, limits: Partial<ReadLimits> = {}): VectorLines {
  const lim = { ...DEFAULT_LIMITS, ...limits };
  const lines: Float64Array[] = [];
  const featureOf: number[] = [];
  const properties: (Record<string, unknown> | null)[] = [];
  const skipped = { nullGeometry: 0, degenerateLines: 0 };
  let positions = 0;
  const addLine = (coords: unknown, f: number): void => {
    if (!Array.isArray(coords)) throw new VectorError("bad_geometry", `feature ${f}: a line's coordinates are not an array`);
    positions += coords.length;
    if (positions > lim.maxCoordinates) {
      throw new VectorError("too_many_coordinates", `more than ${lim.maxCoordinates} positions (reached at feature ${f})`);
    }
    const xy = new Float64Array(coords.length * 2);
    let n = 0;
    for (const p of coords) {
      if (!Array.isArray(p) || p.length < 2 || typeof p[0] !== "number" || typeof p[1] !== "number" || !Number.isFinite(p[0]) || !Number.isFinite(p[1])) {
        throw new VectorError("bad_geometry", `feature ${f}: a position is not [x, y] with finite numbers`);
      }
      // repeated positions add no length and would make zero-length segments
      if (n > 0 && xy[2 * n - 2] === p[0] && xy[2 * n - 1] === p[1]) continue;
      xy[2 * n] = p[0];
      xy[2 * n + 1] = p[1];
      n++;
    }
    if (n < 2) {
      skipped.degenerateLines++;
      return;
    }
    lines.push(xy.slice(0, 2 * n));
    featureOf.push(f);
  };
  for (let f = 0; f < features.length; f++) {
    const feature = features[f];
    if (!isObject(feature) || feature.type !== "Feature") throw new VectorError("bad_geometry", `feature ${f} is not a GeoJSON Feature`);
    properties.push(isObject(feature.properties) ? feature.properties : null);
    const g = feature.geometry;
    if (g === null || g === undefined) {
      skipped.nullGeometry++;
      continue;
    }
    if (!isObject(g)) throw new VectorError("bad_geometry", `feature ${f}: the geometry is not an object`);
    if (g.type === "LineString") addLine(g.coordinates, f);
    else if (g.type === "MultiLineString") {
      if (!Array.isArray(g.coordinates)) throw new VectorError("bad_geometry", `feature ${f}: MultiLineString coordinates are not an array`);
      for (const part of g.coordinates) addLine(part, f);
    } else {
      const hint = g.type === "Polygon" || g.type === "MultiPolygon" ? "; convert the boundaries to lines first" : "";
      throw new VectorError("not_lines", `feature ${f} is a ${String(g.type)}, not lines: only LineString and MultiLineString are accepted${hint}`);
    }
  }
  if (lines.length === 0) throw new VectorError("no_lines", "the file holds no line with two or more distinct positions");
  return { lines, featureOf: Int32Array.from(featureOf), properties, crs, skipped };
}
