import { describe, expect, it } from "vitest";
import { binaryTree } from "@/lib/fractal/synth/binary-tree";
import { strahlerOrder } from "@/lib/network/strahler";

describe("binaryTree()", () => {
  it("has 2^Ω − 1 links with 2^(Ω−ω) of order ω (derived)", () => {
    const network = binaryTree({ order: 6 });
    expect(network.links).toHaveLength(63);
    const order = strahlerOrder(network);
    for (let w = 1; w <= 6; w++) expect(order.filter((o) => o === w).length).toBe(2 ** (6 - w));
  });
  it("draws an H-tree whose junctions are all distinct points (invariant of ratio 2 > √2)", () => {
    const network = binaryTree({ order: 8 });
    const tops = new Set(network.links.map((l) => `${l.path[0]},${l.path[1]}`));
    expect(tops.size).toBe(network.links.length);
  });
  it("makes the source links 1 m long by default (derived: outlet 2^(Ω−1) m, halving)", () => {
    const network = binaryTree({ order: 5 });
    expect(Math.min(...network.links.map((l) => l.lengthM))).toBe(1);
  });
});
