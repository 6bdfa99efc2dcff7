import { describe, expect, it } from "vitest";
import { drainageDensity } from "@/lib/network/drainage-density";
import { tokunagaTree } from "@/lib/fractal/synth/tokunaga-tree";
import { expectClose } from "@/tests/helpers/expect-close";
import { networkFromPointers } from "./small-trees";

describe("drainageDensity()", () => {
  it("divides 3 km of channel by a 2 km² basin: 1.5 km/km² (Horton 1945; derived)", () => {
    const d = drainageDensity(networkFromPointers([-1, 0, 0], [1000, 1000, 1000], undefined, [2e6, 5e5, 5e5]));
    expectClose(d.valuePerKm, 1.5, 1e-12);
    expect(d.outlets).toBe(1);
  });
  it("is 1000 per km on synthetic trees, whose area is channel length × 1 m (derived)", () => {
    expectClose(drainageDensity(tokunagaTree({ a: 1, c: 2, order: 4 })).valuePerKm, 1000, 1e-9);
  });
  it("refuses a network without outlet areas", () => {
    expect(() => drainageDensity(networkFromPointers([-1, 0]))).toThrow(RangeError);
  });
});
