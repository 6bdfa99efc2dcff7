import { describe, expect, it } from "vitest";
import { shreveMagnitude } from "@/lib/network/shreve";
import { binaryTree } from "@/lib/fractal/synth/binary-tree";
import { networkFromPointers, TEN_LINKS } from "./small-trees";

describe("shreveMagnitude()", () => {
  it("counts the sources above each link of a hand-made ten-link tree (Shreve 1966; derived by hand)", () => {
    expect(Array.from(shreveMagnitude(networkFromPointers(TEN_LINKS)))).toEqual([4, 2, 1, 1, 1, 1, 1, 1, 2, 6]);
  });
  it("gives the outlet of a complete binary tree of order 7 magnitude 2^6 = 64 (derived)", () => {
    const network = binaryTree({ order: 7 });
    const m = shreveMagnitude(network);
    const outlet = network.links.findIndex((l) => l.downstream < 0);
    expect(m[outlet]).toBe(64);
  });
  it("equals the number of sources at the outlets in total (invariant)", () => {
    const network = networkFromPointers([-1, 0, 0, 1, 1, -1, 5, 5, 7, 7]);
    const m = shreveMagnitude(network);
    const sources = [2, 3, 4, 6, 8, 9].length;
    expect(m[0] + m[5]).toBe(sources);
  });
});
