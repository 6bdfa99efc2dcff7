import { describe, expect, it } from "vitest";
import { fbmSurface } from "@/lib/fractal/synth/fbm-surface";
import { expectClose } from "@/tests/helpers/expect-close";

describe("fbmSurface()", () => {
  it("has mean 0 and the requested standard deviation exactly (derived: the output is standardised)", () => {
    const g = fbmSurface({ hurst: 0.5, seed: 1, size: 64, sigma: 25 });
    let s = 0, s2 = 0;
    for (const v of g.data) { s += v; s2 += v * v; }
    const n = g.data.length;
    expectClose(s / n, 0, 1e-4);
    expectClose(Math.sqrt(s2 / n), 25, 1e-3);
  });
  it("is reproducible from its seed and smoother for a larger H (invariant; Saupe 1988)", () => {
    const a = fbmSurface({ hurst: 0.3, seed: 3, size: 64 }), b = fbmSurface({ hurst: 0.3, seed: 3, size: 64 });
    expect(a.data).toEqual(b.data);
    const lag1 = (h: number) => {
      const g = fbmSurface({ hurst: h, seed: 3, size: 64 });
      let s = 0;
      for (let y = 0; y < 64; y++) for (let x = 0; x < 63; x++) s += (g.data[y * 64 + x + 1] - g.data[y * 64 + x]) ** 2;
      return s;
    };
    expect(lag1(0.8)).toBeLessThan(lag1(0.3));
  });
  it("rejects a size that is not a power of two and H outside (0, 1)", () => {
    expect(() => fbmSurface({ hurst: 0.5, seed: 1, size: 100 })).toThrow(RangeError);
    expect(() => fbmSurface({ hurst: 1, seed: 1, size: 64 })).toThrow(RangeError);
  });
});
