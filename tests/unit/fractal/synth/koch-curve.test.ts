import { describe, expect, it } from "vitest";
import { kochCurve } from "@/lib/fractal/synth/koch-curve";
import { expectClose } from "@/tests/helpers/expect-close";

describe("kochCurve()", () => {
  it("has 4^n segments of length 3^−n from (0,0) to (1,0), so its length is (4/3)^n (derived; von Koch 1904)", () => {
    const n = 5, c = kochCurve(n);
    expect(c.length).toBe(2 * (4 ** n + 1));
    for (let i = 2; i < c.length; i += 2) expectClose(Math.hypot(c[i] - c[i - 2], c[i + 1] - c[i - 1]), 3 ** -n, 1e-12);
    expectClose(c[c.length - 2], 1, 1e-12);
    expectClose(c[c.length - 1], 0, 1e-12);
  });
  it("peaks at (1/2, √3/6) after one substitution (derived)", () => {
    const c = kochCurve(1);
    expectClose(c[4], 0.5, 1e-12);
    expectClose(c[5], Math.sqrt(3) / 6, 1e-12);
  });
});
