import { describe, expect, it } from "vitest";
import { horton } from "@/lib/network/horton";
import { strahlerOrder } from "@/lib/network/strahler";
import { tokunagaTree } from "@/lib/fractal/synth/tokunaga-tree";
import { peanoBasin } from "@/lib/fractal/synth/peano-basin";
import { binaryTree } from "@/lib/fractal/synth/binary-tree";
import { networkDimension } from "@/lib/network/dimension";
import { linearRegression } from "@/lib/stats/linear-regression";
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

// The Peano basin's stream counts, derived: its Tokunaga matrix is T_k = 2^(k−1) (a = 1, c = 2), so an order-ω
// stream is made by two of order ω − 1 and receives T_k side tributaries of order ω − k; counting from the top
// (order Ω has one stream), N_ω = 2·N_(ω+1) + Σ_k T_k·N_(ω+k), which solves to N = (2·4^k + 1)/3 with k = Ω − ω:
// 1, 3, 11, 43, 171, … . Consecutive ratios are (2·4^(k+1) + 1)/(2·4^k + 1) = 4 − 3/(2·4^k + 1): below 4,
// rising, with limit 4 — the value of Marani, Rigon & Rinaldo (1991).
// Why least squares over a finite tree stays below 4 (derived): N = (2/3)·4^k·(1 + e_k) with e_k = 1/(2·4^k), an
// excess that is largest at the highest orders (+50 % for the top stream, +12.5 % below it, …). It lifts the
// upper end of the ln N line, so the fitted slope of ln N on k is ln 4 + s with s < 0 (ln(1 + e_k) falls with k,
// so its covariance with k is negative). The excess sums to at most Σ e_k = 2/3 while the lever arm Σ (k − k̄)²
// = Ω(Ω² − 1)/12 grows, which bounds |s| ≤ k̄·(2/3)/(Ω(Ω² − 1)/12) = 4/(Ω(Ω + 1)):
// 4·exp(−4/(Ω(Ω + 1))) ≤ R_B(Ω) < 4, a tolerance that shrinks like 16/Ω².
const peanoCountsByRecurrence = (order: number): number[] => {
  const n = new Array<number>(order + 1).fill(0); // n[ω], ω = 1…Ω
  n[order] = 1;
  for (let w = order - 1; w >= 1; w--) {
    n[w] = 2 * n[w + 1];
    for (let k = 1; w + k <= order; k++) n[w] += 2 ** (k - 1) * n[w + k];
  }
  return n.slice(1);
};
const peanoCountClosedForm = (k: number) => (2 * 4 ** k + 1) / 3;
const rbBound = (order: number) => 4 * Math.exp(-4 / (order * (order + 1)));
/** Strahler order of the Peano basin after g replacements is g + 1 (lib/fractal/synth/peano-basin.ts). */
const PEANO_ORDERS = [2, 3, 4, 5, 6, 7, 8, 9];

describe("horton() on the Peano basin (Marani, Rigon & Rinaldo 1991: R_B = R_A = 4, R_L = 2, D = 2)", () => {
  const results = PEANO_ORDERS.map((order) => horton(peanoBasin({ generations: order - 1 })));
  const largest = results[results.length - 1];
  const largestOrder = PEANO_ORDERS[PEANO_ORDERS.length - 1];

  it("counts exactly (2·4^k + 1)/3 streams of order Ω − k, as the Tokunaga recurrence gives (derived)", () => {
    results.forEach((h, i) => {
      const order = PEANO_ORDERS[i];
      const counts = h.table.map((r) => r.streamCount);
      expect(h.highestOrder).toBe(order);
      expect(counts).toEqual(peanoCountsByRecurrence(order));
      expect(counts).toEqual(counts.map((_, w) => peanoCountClosedForm(order - 1 - w)));
    });
    expect(peanoCountsByRecurrence(4)).toEqual([43, 11, 3, 1]);
  });

  it("has per-order ratios N_ω/N_(ω+1) equal to (2·4^(k+1) + 1)/(2·4^k + 1) exactly, rising towards 4 (derived; limit Marani et al. 1991)", () => {
    const n = largest.table.map((r) => r.streamCount);
    const ratios = n.slice(0, -1).map((v, w) => v / n[w + 1]); // ratio of orders w+1 and w+2: k = Ω − w − 2
    ratios.forEach((r, w) => {
      const k = largestOrder - w - 2;
      expect(r).toBe((2 * 4 ** (k + 1) + 1) / (2 * 4 ** k + 1));
      expectClose(4 - r, 3 / (2 * 4 ** k + 1), 1e-12);
    });
    for (let w = 1; w < ratios.length; w++) expect(ratios[w - 1]).toBeGreaterThan(ratios[w]); // lower orders: nearer 4
    expect(ratios[ratios.length - 1]).toBe(3); // the top pair: 3 streams into 1
    expectClose(ratios[0], 4, 1e-4); // orders 1 and 2 of Ω = 9: 4 − 3/(2·4^7 + 1) = 4 − 9.2e-5
  });

  it("gives the least-squares R_B of the closed-form counts, below 4 and within 4·(1 − e^(−4/(Ω(Ω+1)))) of it (derived bound)", () => {
    results.forEach((h, i) => {
      const order = PEANO_ORDERS[i];
      const x = Array.from({ length: order }, (_, w) => w + 1);
      const fromFormula = Math.exp(-linearRegression(x, x.map((w) => Math.log(peanoCountClosedForm(order - w)))).slope);
      expectClose(h.bifurcation!.value, fromFormula, 1e-12);
      expect(h.bifurcation!.value).toBeLessThan(4);
      expect(h.bifurcation!.value).toBeGreaterThanOrEqual(rbBound(order));
    });
    expectClose(results[PEANO_ORDERS.indexOf(8)].bifurcation!.value, 3.835706, 1e-6); // METHODS.md, Tokunaga (1, 2) order 8
    expectClose(largest.bifurcation!.value, 4, 4 - rbBound(largestOrder)); // 3.866049 at Ω = 9, tolerance 0.174
  });

  it("has a least-squares R_B that increases with every order of the tree, towards 4 (derived)", () => {
    const rb = results.map((h) => h.bifurcation!.value);
    for (let i = 1; i < rb.length; i++) expect(rb[i]).toBeGreaterThan(rb[i - 1]);
    for (let i = 1; i < rb.length; i++) expect(4 - rb[i]).toBeLessThan(4 - rb[i - 1]);
  });

  it("gives R_L = 2 exactly: every order-ω stream is 2^(ω−1) unit links long (Marani et al. 1991; derived)", () => {
    for (const h of results) {
      expect(h.table.map((r) => r.meanLengthM)).toEqual(h.table.map((r) => 2 ** (r.order - 1)));
      expectClose(h.length!.value, 2, 1e-12);
      expectClose(h.length!.rSquared, 1, 1e-12);
    }
  });

  it("gives a network dimension ln R_B / ln R_L that rises towards D = 2 without clamping (Marani et al. 1991; bound derived)", () => {
    const d = results.map((h) => networkDimension(h.bifurcation!.value, h.length!.value));
    for (let i = 1; i < d.length; i++) expect(d[i].raw).toBeGreaterThan(d[i - 1].raw);
    for (const dim of d) expect(dim.clamped).toBe(false);
    // 2 − D = −log2(R_B/4) ≤ 4/(Ω(Ω+1)·ln 2) from the R_B bound: 0.064 at Ω = 9
    expectClose(d[d.length - 1].raw, 2, 4 / (largestOrder * (largestOrder + 1) * Math.LN2));
    expectClose(networkDimension(4, 2).raw, 2, 1e-15); // the limit values themselves
  });
});
