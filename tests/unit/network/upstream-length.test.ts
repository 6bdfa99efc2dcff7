import { describe, expect, it } from "vitest";
import { upstreamLength } from "@/lib/network/upstream-length";
import { binaryTree } from "@/lib/fractal/synth/binary-tree";
import { networkFromPointers, TEN_LINKS } from "./small-trees";

describe("upstreamLength()", () => {
  it("sums every link above and including each link of a hand-made tree (derived by hand)", () => {
    const lengths = [2, 3, 1, 1, 1, 1, 1, 1, 5, 7];
    const l = upstreamLength(networkFromPointers(TEN_LINKS, lengths));
    expect(l[0]).toBe(2 + 3 + 1 + 1 + 1 + 1);
    expect(l[9]).toBe(lengths.reduce((a, b) => a + b, 0)); // the outlet sees the whole network (invariant)
  });
  it("gives the outlet of a binary tree of order 4 with halving links 8 + 2·4 + 4·2 + 8·1 = 32 m (derived)", () => {
    const network = binaryTree({ order: 4 });
    const outlet = network.links.findIndex((l) => l.downstream < 0);
    expect(upstreamLength(network)[outlet]).toBe(32);
  });
});
