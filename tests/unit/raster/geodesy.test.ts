import { describe, it } from "vitest";
import { geodesicDistance, geodesicRingArea } from "@/lib/raster/geodesy";
import { expectClose } from "@/tests/helpers/expect-close";

describe("geodesicDistance()", () => {
  it("gives 20,003,931.458625 m from (0,0) to (0,180) (METHODS.md, derived with geographiclib; Karney 2013)", () => {
    expectClose(geodesicDistance(0, 0, 180, 0), 20003931.458625, 1e-5);
  });
  it("gives one degree of the equator as a·π/180 (derived)", () => {
    expectClose(geodesicDistance(0, 0, 1, 0), (6378137 * Math.PI) / 180, 1e-6);
  });
});

describe("geodesicRingArea()", () => {
  it("gives 12,308,778,361.469 m² for the geodesic polygon through the corners of the 1°×1° cell at 0–1°N, either winding (METHODS.md, derived)", () => {
    const ring = Float64Array.of(0, 0, 1, 0, 1, 1, 0, 1, 0, 0);
    expectClose(geodesicRingArea(ring), 12308778361.469, 0.01);
    expectClose(geodesicRingArea(Float64Array.of(0, 0, 0, 1, 1, 1, 1, 0)), 12308778361.469, 0.01);
  });
});
