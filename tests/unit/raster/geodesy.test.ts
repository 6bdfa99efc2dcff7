import { describe, it } from "vitest";
import { geodesicDistance } from "@/lib/raster/geodesy";
import { expectClose } from "@/tests/helpers/expect-close";

describe("geodesicDistance()", () => {
  it("gives 20,003,931.458625 m from (0,0) to (0,180) (METHODS.md, derived with geographiclib; Karney 2013)", () => {
    expectClose(geodesicDistance(0, 0, 180, 0), 20003931.458625, 1e-5);
  });
  it("gives one degree of the equator as a·π/180 (derived)", () => {
    expectClose(geodesicDistance(0, 0, 1, 0), (6378137 * Math.PI) / 180, 1e-6);
  });
});
