import { describe, expect, it } from "vitest";
import { horton } from "@/lib/network/horton";
import { strahlerOrder } from "@/lib/network/strahler";
import { tokunagaTree } from "@/lib/fractal/synth/tokunaga-tree";
import { peanoBasin } from "@/lib/fractal/synth/peano-basin";
import { binaryTree } from "@/lib/fractal/synth/binary-tree";
import { expectClose } from "@/tests/helpers/expect-close";

describe("horton()", () => {
  it("on the Tokunaga (1, 2) tree of order 5 gives the biased least-squares R_B = 3.649505, R_L = 2, R_A = 4.261827 (derived, METHODS.md)", () => {
    const h = horton(tokunagaTree({ a: 1, c: 2, order: 5 }));
    expect(h.table.map((r) => r.streamCount)).toEqual([171, 43, 11, 3, 1]); // (2·4^(Ω−ω)+1)/3 (derived)
    expect(h.ordersUsed).toEqual([1, 2, 3, 4, 5]);
    expectClose(h.bifurcation!.value, 3.649505, 1e-6);
    expectClose(h.length!.value, 2, 1e-6);
    expectClose(h.area!.value, 4.261827, 1e-6);
    expect(h.table.map((r) => r.meanLengthM)).toEqual([1, 2, 4, 8, 16]); // 2^(ω−1) links per stream (derived)
    expect(h.slope).toBeNull(); // no drops on a topological tree
  });
  it("on Tokunaga (1, 2) trees of order 6 and 8 gives R_B = 3.735401 and 3.835706 (derived, METHODS.md)", () => {
    expectClose(horton(tokunagaTree({ a: 1, c: 2, order: 6 })).bifurcation!.value, 3.735401, 1e-6);
    expectClose(horton(tokunagaTree({ a: 1, c: 2, order: 8 })).bifurcation!.value, 3.835706, 1e-6);
  });
  it("leaves the highest order out when asked: orders 1–4 of the order-5 tree give R_B = 3.854518 (derived by least squares of ln N on ω)", () => {
    const h = horton(tokunagaTree({ a: 1, c: 2, order: 5 }), { excludeHighestOrder: true });
    expect(h.ordersUsed).toEqual([1, 2, 3, 4]);
    expect(h.bifurcation!.ordersUsed).toEqual([1, 2, 3, 4]);
    expectClose(h.bifurcation!.value, 3.854518, 1e-6);
    expect(h.table).toHaveLength(5); // the table still shows every order
  });
  it("carries the slope's t interval through exp, so the interval brackets the ratio (derived)", () => {
    const r = horton(tokunagaTree({ a: 1, c: 2, order: 6 })).bifurcation!;
    expectClose(r.ci[0], Math.exp(-r.fit.slopeCi[1]), 1e-12);
    expectClose(r.ci[1], Math.exp(-r.fit.slopeCi[0]), 1e-12);
    expect(r.ci[0]).toBeLessThan(r.value);
    expect(r.ci[1]).toBeGreaterThan(r.value);
    expectClose(r.stdError, r.value * r.lnStdError, 1e-12);
    expect(r.confidence).toBe(0.95);
  });
  it("on a complete binary tree gives R_B = 2 exactly with R² = 1 (derived)", () => {
    const r = horton(binaryTree({ order: 7 })).bifurcation!;
    expectClose(r.value, 2, 1e-12);
    expect(r.rSquared).toBe(1);
    expectClose(r.ci[1] - r.ci[0], 0, 1e-9);
  });
  it("on the Peano basin gives R_L = 2 exactly and counts whose ratio tends to R_B = 4, with least squares biased low (Marani et al. 1991; bias derived)", () => {
    const h = horton(peanoBasin({ generations: 8 }));
    expectClose(h.length!.value, 2, 1e-12);
    const n = h.table.map((r) => r.streamCount);
    const a = h.table.map((r) => r.meanAreaM2);
    expectClose(n[0] / n[1], 4, 2e-4); // (2·4^8+1)/(2·4^7+1)
    expectClose(a[8] / a[7], 4, 2e-4);
    const rb = [4, 6, 8].map((g) => horton(peanoBasin({ generations: g })).bifurcation!.value);
    expect(rb[0]).toBeLessThan(rb[1]);
    expect(rb[1]).toBeLessThan(rb[2]);
    expect(rb[2]).toBeLessThan(4);
  });
  it("recovers R_S = 3 from streams whose slopes fall threefold per order (derived)", () => {
    const network = tokunagaTree({ a: 1, c: 2, order: 5, linkLengthM: 10 });
    const order = strahlerOrder(network);
    for (const link of network.links) link.dropM = link.lengthM * 0.1 * 3 ** -(order[link.id] - 1);
    const h = horton(network);
    expectClose(h.slope!.value, 3, 1e-12);
    expectClose(h.table[0].meanSlope, 0.1, 1e-12);
  });
  it("keeps every ratio when all lengths and areas are scaled (invariant)", () => {
    const a = horton(tokunagaTree({ a: 1, c: 2, order: 6 }));
    const b = horton(tokunagaTree({ a: 1, c: 2, order: 6, linkLengthM: 37 }));
    expectClose(b.length!.value, a.length!.value, 1e-12);
    expectClose(b.area!.value, a.area!.value, 1e-12);
    expectClose(b.table[2].meanLengthM, 37 * a.table[2].meanLengthM, 1e-9);
  });
  it("refuses an empty network", () => {
    expect(() => horton({ links: [], crs: "" })).toThrow(RangeError);
  });
});
