import { describe, expect, it } from "vitest";
import { tokunaga, tokunagaHortonRatios } from "@/lib/network/tokunaga";
import { horton } from "@/lib/network/horton";
import { tokunagaTree } from "@/lib/fractal/synth/tokunaga-tree";
import { peanoBasin } from "@/lib/fractal/synth/peano-basin";
import { binaryTree } from "@/lib/fractal/synth/binary-tree";
import { expectClose } from "@/tests/helpers/expect-close";
import { networkFromPointers, TEN_LINKS } from "./small-trees";

describe("tokunaga()", () => {
  it("recovers (a, c) = (1, 2) from the Tokunaga tree of order 6 with R² = 1 (derived)", () => {
    const t = tokunaga(tokunagaTree({ a: 1, c: 2, order: 6 }));
    expect(t.tk).toEqual([1, 2, 4, 8, 16]);
    expectClose(t.a!, 1, 1e-12);
    expectClose(t.c!, 2, 1e-12);
    expectClose(t.rSquared!, 1, 1e-12);
    expect(t.sideCounts[6].slice(1)).toEqual([1, 2, 4, 8, 16]);
  });
  it("recovers (a, c) = (2, 3) from another integer Tokunaga tree (derived)", () => {
    const t = tokunaga(tokunagaTree({ a: 2, c: 3, order: 5 }));
    expectClose(t.a!, 2, 1e-12);
    expectClose(t.c!, 3, 1e-12);
  });
  it("finds the Peano basin to be Tokunaga (1, 2) (Tarboton 1996, from memory; derived from the replacement rule)", () => {
    const t = tokunaga(peanoBasin({ generations: 6 }));
    expectClose(t.a!, 1, 1e-12);
    expectClose(t.c!, 2, 1e-12);
  });
  it("counts the two side tributaries of a triple junction on a hand-made tree (derived by hand)", () => {
    const t = tokunaga(networkFromPointers(TEN_LINKS));
    expect(t.sideCounts[2][1]).toBe(2);
    expect(t.streamsOfOrder).toEqual([0, 6, 2, 1]);
    expectClose(t.tk[0], 2 / 3, 1e-12); // two side tributaries over the three streams of order ≥ 2
    expect(t.a).toBeNull(); // only T_1 is positive: no line to fit
  });
  it("finds no side tributaries in a complete binary tree (derived)", () => {
    expect(tokunaga(binaryTree({ order: 5 })).tk).toEqual([0, 0, 0, 0]);
  });
});

describe("tokunagaHortonRatios()", () => {
  it("gives R_B = 4 and R_L = 2 for (1, 2) (Tokunaga 1978; Peckham 1995; derived)", () => {
    const r = tokunagaHortonRatios(1, 2);
    expectClose(r.bifurcationRatio, 4, 1e-12);
    expect(r.lengthRatio).toBe(2);
  });
  it("gives R_B = 2 for a = 0, where the tree is binary (derived, METHODS.md)", () => {
    expect(tokunagaHortonRatios(0, 5).bifurcationRatio).toBe(2);
  });
  it("is approached from below by least squares on finite trees of growing order (derived)", () => {
    const rb = tokunagaHortonRatios(2, 3).bifurcationRatio;
    const finite = [4, 6].map((order) => horton(tokunagaTree({ a: 2, c: 3, order })).bifurcation!.value);
    expect(finite[0]).toBeLessThan(finite[1]);
    expect(finite[1]).toBeLessThan(rb);
  });
});
