import { describe, expect, it } from "vitest";
import { peanoBasin } from "@/lib/fractal/synth/peano-basin";
import { tokunagaTree } from "@/lib/fractal/synth/tokunaga-tree";
import { hortonTable } from "@/lib/network/horton";
import { strahlerStreams } from "@/lib/network/strahler";

describe("peanoBasin()", () => {
  it("has (4^(g+1) − 1)/3 links after g replacements (derived: each link makes 3, each source 2 more)", () => {
    for (const g of [0, 1, 3, 5]) expect(peanoBasin({ generations: g }).links).toHaveLength((4 ** (g + 1) - 1) / 3);
  });
  it("has the stream table of the Tokunaga (1, 2) tree of order g + 1 (derived; two independent constructions)", () => {
    const a = hortonTable(strahlerStreams(peanoBasin({ generations: 4 })));
    const b = hortonTable(strahlerStreams(tokunagaTree({ a: 1, c: 2, order: 5 })));
    expect(a).toEqual(b);
  });
  it("keeps every link one lattice step long in the plane (derived)", () => {
    for (const l of peanoBasin({ generations: 3, linkLengthM: 2 }).links) {
      expect(Math.hypot(l.path[2] - l.path[0], l.path[3] - l.path[1])).toBe(2);
      expect(l.lengthM).toBe(2);
    }
  });
  it("refuses a negative generation count", () => {
    expect(() => peanoBasin({ generations: -1 })).toThrow(RangeError);
  });
});
