import { describe, expect, it } from "vitest";
import { channelMask, km2ToM2 } from "@/lib/hydro/channels";

describe("channelMask()", () => {
  it("marks cells whose area reaches the threshold, the threshold itself included (derived)", () => {
    const area = Float64Array.of(0, 899_999, 900_000, 4.5e6);
    expect(Array.from(channelMask(area, km2ToM2(0.9)))).toEqual([0, 0, 1, 1]);
  });

  it("marks fewer cells as the threshold grows (invariant)", () => {
    const area = Float64Array.from({ length: 200 }, (_, i) => (i * 7919) % 1000 * 1e4);
    let previous = Infinity;
    for (const km2 of [0.1, 0.5, 1, 5]) {
      const count = channelMask(area, km2ToM2(km2)).reduce((s, v) => s + v, 0);
      expect(count).toBeLessThanOrEqual(previous);
      previous = count;
    }
  });

  it("rejects a threshold that is not a positive number", () => {
    expect(() => channelMask(new Float64Array(1), 0)).toThrow(RangeError);
    expect(() => km2ToM2(-1)).toThrow(/positive number of km²/);
    expect(() => km2ToM2(Number.NaN)).toThrow(RangeError);
  });
});

describe("km2ToM2()", () => {
  it("turns 0.35 km² into 350 000 m² (SI definition)", () => {
    expect(km2ToM2(0.35)).toBe(350_000);
  });
});
