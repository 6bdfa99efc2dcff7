import { describe, expect, it } from "vitest";
import { hack, mainStreamLength } from "@/lib/network/hack";
import { peanoBasin } from "@/lib/fractal/synth/peano-basin";
import { expectClose } from "@/tests/helpers/expect-close";
import { networkFromPointers, TEN_LINKS } from "./small-trees";

describe("mainStreamLength()", () => {
  it("follows the longest path to a source on a hand-made tree (derived by hand)", () => {
    const lengths = [2, 3, 1, 1, 1, 1, 1, 1, 5, 7];
    const l = mainStreamLength(networkFromPointers(TEN_LINKS, lengths));
    expect(l[0]).toBe(6); // 3 → 1 → 0: 1 + 3 + 2
    expect(l[9]).toBe(13); // 6 → 8 → 9: 1 + 5 + 7 beats 6 + 7
  });
});

describe("hack()", () => {
  it("on a chain of links, where area is length × 1 m, gives h = 1 and C = 1000 km per km² (derived)", () => {
    const n = 8, down = Array.from({ length: n }, (_, i) => i - 1);
    // link i drains everything above it: area = upstream length × 1 m
    const lengths = down.map(() => 250);
    const areas = down.map((_, i) => (n - i) * 250 * 1);
    const h = hack(networkFromPointers(down, lengths, undefined, areas));
    expectClose(h.exponent, 1, 1e-12);
    expectClose(h.coefficientKm, 1000, 1e-6);
    expect(h.rSquared).toBe(1);
    expect(h.pointsFitted).toBe(n);
  });
  it("on the Peano basin gives h ≈ 0.5 over sub-basins of at least 1000 m² (ln R_L / ln R_A, derived)", () => {
    const h = hack(peanoBasin({ generations: 9 }), { minAreaM2: 1000 });
    expectClose(h.exponent, 0.5, 0.01);
    expect(h.minAreaKm2).toBeGreaterThanOrEqual(1000 / 1e6);
    expect(h.exponentCi[0]).toBeLessThan(h.exponent);
  });
  it("is biased upwards when the smallest sub-basins are fitted too (derived: short sources dominate the count)", () => {
    const all = hack(peanoBasin({ generations: 7 })).exponent;
    expect(all).toBeGreaterThan(0.55);
  });
  it("ignores sub-basins of unknown area and refuses when fewer than 3 remain", () => {
    expect(() => hack(networkFromPointers([-1, 0, 0]))).toThrow(RangeError);
  });
});

describe("hack() with lengths measured from the divide", () => {
  it("uses every link's mainStreamLengthM when all links carry one: L = 2·√A gives h = 0.5 (derived)", () => {
    const areas = [4e6, 1e6, 1e6, 2.25e6];
    const network = networkFromPointers([-1, 0, 0, -1], [100, 100, 100, 100], undefined, areas);
    network.links.forEach((l) => { l.mainStreamLengthM = 2000 * Math.sqrt(l.areaM2 / 1e6); });
    const h = hack(network);
    expectClose(h.exponent, 0.5, 1e-12);
    expectClose(h.coefficientKm, 2, 1e-12);
    expectClose(mainStreamLength(network)[0], 4000, 1e-9);
  });
});
