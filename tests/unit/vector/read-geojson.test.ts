import { describe, expect, test } from "vitest";
import { checkJsonDepth, parseGeoJsonText, readGeoJson } from "@/lib/vector/read-geojson";
import { VectorError } from "@/lib/vector/vector-error";

const feature = (geometry: unknown, properties: unknown = {}) => ({ type: "Feature", properties, geometry });
const collection = (...features: unknown[]) => ({ type: "FeatureCollection", features });

/** the VectorError a call throws */
function refusal(f: () => unknown): VectorError {
  try {
    f();
  } catch (e) {
    if (e instanceof VectorError) return e;
    throw e;
  }
  throw new Error("expected a VectorError");
}

describe("readGeoJson()", () => {
  test("reads LineString and MultiLineString parts with their feature index and drops repeated positions (RFC 7946 §3.1.4–3.1.5)", () => {
    const doc = collection(
      feature({ type: "LineString", coordinates: [[0, 0], [1, 0], [1, 0], [2, 1]] }, { id: "a" }),
      feature({ type: "MultiLineString", coordinates: [[[5, 5], [6, 6]], [[7, 7, 100], [8, 8, 90]]] }),
    );
    const r = readGeoJson(doc);
    expect(r.lines.map((l) => Array.from(l))).toEqual([[0, 0, 1, 0, 2, 1], [5, 5, 6, 6], [7, 7, 8, 8]]);
    expect(Array.from(r.featureOf)).toEqual([0, 1, 1]);
    expect(r.properties[0]).toEqual({ id: "a" });
    expect(r.crs).toEqual({ kind: "rfc7946" });
  });

  test("a MultiLineString reads as the same lines as its parts given as LineStrings (invariant)", () => {
    const parts = [[[0, 0], [1, 1]], [[2, 2], [3, 1], [4, 0]]];
    const multi = readGeoJson(collection(feature({ type: "MultiLineString", coordinates: parts })));
    const single = readGeoJson(collection(...parts.map((coordinates) => feature({ type: "LineString", coordinates }))));
    expect(multi.lines).toEqual(single.lines);
    expect(readGeoJson(feature({ type: "LineString", coordinates: parts[0] })).lines).toEqual(single.lines.slice(0, 1));
  });

  test("refuses a Polygon as 'not lines', naming the feature index (derived)", () => {
    const doc = collection(
      feature({ type: "LineString", coordinates: [[0, 0], [1, 0]] }),
      feature({ type: "Polygon", coordinates: [[[0, 0], [1, 0], [1, 1], [0, 0]]] }),
    );
    const e = refusal(() => readGeoJson(doc));
    expect(e.code).toBe("not_lines");
    expect(e.detail).toMatch(/feature 1 is a Polygon, not lines/);
  });

  test("honours the named crs member of 2008 GeoJSON (Butler et al. 2008)", () => {
    const doc = { ...collection(feature({ type: "LineString", coordinates: [[500000, 0], [500100, 0]] })), crs: { type: "name", properties: { name: "urn:ogc:def:crs:EPSG::32632" } } };
    expect(readGeoJson(doc).crs).toEqual({ kind: "crs-member", name: "urn:ogc:def:crs:EPSG::32632" });
  });

  test("refuses more positions than the coordinate limit, and a collection with no line (common practice)", () => {
    const doc = collection(feature({ type: "LineString", coordinates: [[0, 0], [1, 0], [2, 0]] }));
    expect(refusal(() => readGeoJson(doc, { maxCoordinates: 2 })).code).toBe("too_many_coordinates");
    expect(refusal(() => readGeoJson(collection(feature(null)))).code).toBe("no_lines");
    expect(refusal(() => readGeoJson(collection(feature({ type: "LineString", coordinates: [[0, "x"], [1, 0]] })))).code).toBe("bad_geometry");
  });
});

describe("parseGeoJsonText()", () => {
  test("refuses a document nested 100 000 deep without overflowing the stack (regression: hostile nesting)", () => {
    const deep = "[".repeat(100_000) + "]".repeat(100_000);
    const e = refusal(() => parseGeoJsonText(deep));
    expect(e.code).toBe("too_deep");
    const inProperties = `{"type":"FeatureCollection","features":[{"type":"Feature","properties":{"a":${"[".repeat(100_000)}${"]".repeat(100_000)}},"geometry":null}]}`;
    expect(refusal(() => parseGeoJsonText(inProperties)).code).toBe("too_deep");
  });

  test("counts brackets inside strings as text, not nesting (derived)", () => {
    expect(() => checkJsonDepth(`{"name":"${"[".repeat(1000)}\\"{"}`, 2)).not.toThrow();
    expect(() => checkJsonDepth("[[[]]]", 2)).toThrow(VectorError);
    expect(refusal(() => parseGeoJsonText("{not json")).code).toBe("not_json");
  });
});
