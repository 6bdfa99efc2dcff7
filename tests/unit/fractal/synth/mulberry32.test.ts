import { describe, expect, it } from "vitest";
import { mulberry32, normalDeviates } from "@/lib/fractal/synth/mulberry32";
import { expectClose } from "@/tests/helpers/expect-close";

describe("mulberry32()", () => {
  it("repeats its sequence for the same seed and differs for another (invariant)", () => {
    const a = mulberry32(42), b = mulberry32(42), c = mulberry32(43);
    const sa = Array.from({ length: 5 }, a), sb = Array.from({ length: 5 }, b), sc = Array.from({ length: 5 }, c);
    expect(sa).toEqual(sb);
    expect(sa).not.toEqual(sc);
  });
  it("stays in [0, 1) with mean 1/2 and variance 1/12 over 10⁵ draws, within 3 standard errors (common practice)", () => {
    const u = mulberry32(1);
    let s = 0, s2 = 0, lo = 1, hi = 0;
    const n = 100_000;
    for (let i = 0; i < n; i++) { const v = u(); s += v; s2 += v * v; lo = Math.min(lo, v); hi = Math.max(hi, v); }
    expect(lo).toBeGreaterThanOrEqual(0);
    expect(hi).toBeLessThan(1);
    expectClose(s / n, 0.5, 3 * Math.sqrt(1 / 12 / n));
    expectClose(s2 / n - (s / n) ** 2, 1 / 12, 0.002);
  });
});

describe("normalDeviates()", () => {
  it("gives mean 0 and variance 1 over 10⁵ draws (Box & Muller 1958; common practice tolerance)", () => {
    const g = normalDeviates(7);
    let s = 0, s2 = 0;
    const n = 100_000;
    for (let i = 0; i < n; i++) { const v = g(); s += v; s2 += v * v; }
    expectClose(s / n, 0, 3 / Math.sqrt(n));
    expectClose(s2 / n, 1, 0.02);
  });
});
