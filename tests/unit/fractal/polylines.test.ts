import { describe, expect, it } from "vitest";
import { checkPolylines, medianSegmentLength, pointDistance } from "@/lib/fractal/polylines";
import { expectClose } from "@/tests/helpers/expect-close";

describe("checkPolylines()", () => {
  it("refuses odd coordinate counts, single vertices, non-finite numbers and latitudes beyond ±90°", () => {
    expect(() => checkPolylines({ lines: [Float64Array.of(0, 0, 1)], coordinates: "metres" })).toThrow(RangeError);
    expect(() => checkPolylines({ lines: [Float64Array.of(0, 0)], coordinates: "metres" })).toThrow(RangeError);
    expect(() => checkPolylines({ lines: [Float64Array.of(0, 0, NaN, 1)], coordinates: "metres" })).toThrow(RangeError);
    expect(() => checkPolylines({ lines: [Float64Array.of(0, 0, 10, 91)], coordinates: "lonlat" })).toThrow(RangeError);
    expect(() => checkPolylines({ lines: [], coordinates: "metres" })).toThrow(RangeError);
    expect(() => checkPolylines({ lines: [Float64Array.of(0, 0, 10, 91)], coordinates: "metres" })).not.toThrow();
  });
});

describe("pointDistance()", () => {
  it("is Euclidean for metres and geodesic for lon/lat: 1° of the equator is a·π/180 (derived, WGS84)", () => {
    expect(pointDistance("metres")(0, 0, 3, 4)).toBe(5);
    expectClose(pointDistance("lonlat")(0, 0, 1, 0), (6378137 * Math.PI) / 180, 1e-6);
  });
});

describe("medianSegmentLength()", () => {
  it("gives the middle segment length over all polylines (derived)", () => {
    const m = medianSegmentLength({ lines: [Float64Array.of(0, 0, 1, 0, 4, 0), Float64Array.of(0, 0, 0, 10)], coordinates: "metres" });
    expect(m).toBe(3);
  });
});
