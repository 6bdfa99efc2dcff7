import { describe, expect, it } from "vitest";
import { networkDimension } from "@/lib/network/dimension";
import { tokunagaHortonRatios } from "@/lib/network/tokunaga";
import { expectClose } from "@/tests/helpers/expect-close";

describe("networkDimension()", () => {
  it("bounds the raw 2.71 of a Tokunaga (0.5, 1.5) network to 2 (derived, METHODS.md)", () => {
    const { bifurcationRatio, lengthRatio } = tokunagaHortonRatios(0.5, 1.5);
    const d = networkDimension(bifurcationRatio, lengthRatio);
    expectClose(d.raw, Math.log(3) / Math.log(1.5), 1e-12); // R_B = 3, R_L = 1.5 (derived)
    expectClose(d.raw, 2.71, 0.005);
    expect(d.bounded).toBe(2);
    expect(d.clamped).toBe(true);
  });
  it("gives D = 2 for the Peano ratios R_B = 4, R_L = 2 without clamping (Marani et al. 1991)", () => {
    const d = networkDimension(4, 2);
    expectClose(d.raw, 2, 1e-15);
    expect(d.clamped).toBe(false);
  });
  it("raises a dimension below 1 to 1 (a network is at least a line; derived)", () => {
    const d = networkDimension(1.5, 2);
    expect(d.bounded).toBe(1);
    expect(d.raw).toBeLessThan(1);
  });
  it("refuses R_L ≤ 1, where ln R_L is not positive", () => {
    expect(() => networkDimension(4, 1)).toThrow(RangeError);
  });
});
