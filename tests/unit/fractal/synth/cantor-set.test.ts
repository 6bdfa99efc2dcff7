import { describe, expect, it } from "vitest";
import { cantorSet } from "@/lib/fractal/synth/cantor-set";

describe("cantorSet()", () => {
  it("keeps 2^k of 3^k cells and removes the middle third at every level (derived; Cantor 1883)", () => {
    const g = cantorSet(4);
    expect(g.width).toBe(81);
    expect(g.data.reduce((a, b) => a + b, 0)).toBe(16);
    expect(Array.from(g.data.subarray(27, 54)).every((v) => v === 0)).toBe(true);
    expect(Array.from(g.data.subarray(0, 9))).toEqual([1, 0, 1, 0, 0, 0, 1, 0, 1]);
  });
});
