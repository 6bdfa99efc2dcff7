import { describe, expect, it } from "vitest";
import { fbmProfile } from "@/lib/fractal/synth/fbm-profile";
import { expectClose } from "@/tests/helpers/expect-close";

describe("fbmProfile()", () => {
  it("has mean 0 and the requested standard deviation exactly (derived: the output is standardised)", () => {
    const z = fbmProfile({ hurst: 0.4, seed: 2, length: 1024, sigma: 7 });
    const mean = z.reduce((a, b) => a + b) / z.length;
    expectClose(mean, 0, 1e-9);
    expectClose(Math.sqrt(z.reduce((a, b) => a + b * b, 0) / z.length), 7, 1e-9);
  });
  it("is reproducible from its seed, and a larger H gives smaller one-step increments (invariant; Saupe 1988)", () => {
    expect(fbmProfile({ hurst: 0.5, seed: 9, length: 256 })).toEqual(fbmProfile({ hurst: 0.5, seed: 9, length: 256 }));
    const step = (h: number) => {
      const z = fbmProfile({ hurst: h, seed: 9, length: 1024 });
      let s = 0;
      for (let i = 1; i < z.length; i++) s += (z[i] - z[i - 1]) ** 2;
      return s;
    };
    expect(step(0.8)).toBeLessThan(step(0.2));
  });
  it("rejects a length that is not a power of two", () => {
    expect(() => fbmProfile({ hurst: 0.5, seed: 1, length: 1000 })).toThrow(RangeError);
  });
});
