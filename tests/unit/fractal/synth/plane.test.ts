import { describe, expect, it } from "vitest";
import { plane } from "@/lib/fractal/synth/plane";

describe("plane()", () => {
  it("gives z = z0 + gx·x + gy·y with rows going south (derived)", () => {
    const g = plane(4, 3, { z0: 10, gx: 2, gy: -1 });
    expect(Array.from(g.data)).toEqual([10, 12, 14, 16, 9, 11, 13, 15, 8, 10, 12, 14]);
  });
});
