import { describe, expect, it } from "vitest";
import { crsFromEpsg, crsFromGeoKeys, parseGeoKeys, verticalUnitToMetre, GEOKEY } from "@/lib/raster/crs";
import { RasterError } from "@/lib/raster/errors";

describe("crsFromEpsg()", () => {
  it("resolves EPSG:4326 as geographic WGS 84 (EPSG registry via epsg-index)", () => {
    const crs = crsFromEpsg(4326);
    expect([crs.name, crs.geographic]).toEqual(["WGS 84", true]);
    expect(crs.linearUnitToMetre).toBeNaN();
  });
  it.each([
    [32633, 1],
    [2263, 1200 / 3937],
    [2992, 0.3048],
  ])("EPSG:%i has %d metres per unit (EPSG units 9001, 9003, 9002; NIST foot definitions)", (code, factor) => {
    expect(crsFromEpsg(code).linearUnitToMetre).toBe(factor);
  });
  it("an unknown or non-horizontal code is crs-unknown, naming the code (derived)", () => {
    expect(() => crsFromEpsg(999999)).toThrow(/999999/);
    expect(() => crsFromEpsg(5703)).toThrow(RasterError); // NAVD88 height: a vertical CRS
    expect(() => crsFromEpsg(1.5)).toThrow(RasterError);
  });
});

describe("parseGeoKeys() and crsFromGeoKeys() (GeoTIFF 1.1, OGC 19-008r4 §7)", () => {
  const dir = (...keys: number[][]) => [1, 1, 0, keys.length, ...keys.flat()];
  it("reads short keys inline and double keys from GeoDoubleParams", () => {
    const keys = parseGeoKeys(dir([1024, 0, 1, 1], [3072, 0, 1, 32633], [2057, 34736, 1, 1]), [0, 6378137]);
    expect(keys.get(GEOKEY.ProjectedCSType)).toBe(32633);
    expect(keys.get(2057)).toBe(6378137);
  });
  it("a projected model with an EPSG code resolves to that CRS", () => {
    expect(crsFromGeoKeys(parseGeoKeys(dir([1024, 0, 1, 1], [3072, 0, 1, 2263], [3076, 0, 1, 9003]))).epsg).toBe(2263);
  });
  it("a unit key that contradicts the EPSG code's unit is refused (derived)", () => {
    expect(() => crsFromGeoKeys(parseGeoKeys(dir([1024, 0, 1, 1], [3072, 0, 1, 2263], [3076, 0, 1, 9001])))).toThrow(RasterError);
  });
  it("user-defined (32767) geographic and projected CRSs say that an `epsg` option supplies the code", () => {
    for (const key of [[2048, 0, 1, 32767], [3072, 0, 1, 32767]]) {
      const model = key[0] === 2048 ? 2 : 1;
      expect(() => crsFromGeoKeys(parseGeoKeys(dir([1024, 0, 1, model], key)))).toThrow(/user-defined.*`epsg` option/);
    }
  });
  it("the `epsg` option overrides the keys (derived)", () => {
    expect(crsFromGeoKeys(parseGeoKeys(dir([1024, 0, 1, 1], [3072, 0, 1, 32767])), 32633).epsg).toBe(32633);
  });
  it("no CRS key at all is crs-missing (derived)", () => {
    expect(() => crsFromGeoKeys(null)).toThrow(expect.objectContaining({ code: "crs-missing" }));
    expect(() => crsFromGeoKeys(parseGeoKeys(dir([1024, 0, 1, 1])))).toThrow(expect.objectContaining({ code: "crs-missing" }));
  });
  it("vertical units: metres by default, feet converted (EPSG units 9001–9003)", () => {
    expect(verticalUnitToMetre(null)).toBe(1);
    expect(verticalUnitToMetre(parseGeoKeys(dir([4099, 0, 1, 9002])))).toBe(0.3048);
    expect(verticalUnitToMetre(parseGeoKeys(dir([4099, 0, 1, 9003])))).toBe(1200 / 3937);
  });
  it("vertical units from the EPSG vertical CRS when only VerticalCSTypeGeoKey is given (EPSG:8228 NAVD88 height (ft), 5703 in metres)", () => {
    expect(verticalUnitToMetre(parseGeoKeys(dir([4096, 0, 1, 8228])))).toBe(0.3048);
    expect(verticalUnitToMetre(parseGeoKeys(dir([4096, 0, 1, 5703])))).toBe(1);
    expect(() => verticalUnitToMetre(parseGeoKeys(dir([4096, 0, 1, 6357])))).toThrow(/depth/);
  });
});
