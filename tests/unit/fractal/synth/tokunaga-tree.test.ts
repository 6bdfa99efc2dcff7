import { describe, expect, it } from "vitest";
import { tokunagaTree } from "@/lib/fractal/synth/tokunaga-tree";
import { strahlerStreams } from "@/lib/network/strahler";
import { topologicalOrder } from "@/lib/network/model";

describe("tokunagaTree()", () => {
  it("builds the (1, 2) tree of order 4 with N_ω = (2·4^(Ω−ω)+1)/3 and 2^(ω−1) links per stream (derived)", () => {
    const s = strahlerStreams(tokunagaTree({ a: 1, c: 2, order: 4 }));
    const counts = [0, 0, 0, 0], links = [0, 0, 0, 0];
    for (let i = 0; i < s.count; i++) { counts[s.order[i] - 1]++; links[s.order[i] - 1] += s.linkCount[i]; }
    expect(counts).toEqual([43, 11, 3, 1]);
    expect(links.map((l, i) => l / counts[i])).toEqual([1, 2, 4, 8]);
  });
  it("makes one outlet, unit links and areas equal to the channel length above (invariant)", () => {
    const network = tokunagaTree({ a: 1, c: 2, order: 5 });
    expect(network.links.filter((l) => l.downstream < 0)).toHaveLength(1);
    expect(network.links.every((l) => l.lengthM === 1)).toBe(true);
    const outlet = network.links.find((l) => l.downstream < 0)!;
    expect(outlet.areaM2).toBe(network.links.length);
    expect(topologicalOrder(network)).toHaveLength(network.links.length);
  });
  it("draws each link as a segment as long as the link (derived)", () => {
    const network = tokunagaTree({ a: 2, c: 2, order: 3, linkLengthM: 5 });
    for (const l of network.links) expect(Math.hypot(l.path[2] - l.path[0], l.path[3] - l.path[1])).toBeCloseTo(5, 12);
  });
  it("refuses parameters that give a fractional number of tributaries", () => {
    expect(() => tokunagaTree({ a: 0.5, c: 1.5, order: 3 })).toThrow(RangeError);
  });
});
