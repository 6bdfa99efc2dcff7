import { describe, expect, it } from "vitest";
import { strahlerOrder, strahlerStreams } from "@/lib/network/strahler";
import { networkFromPointers, TEN_LINKS } from "./small-trees";

describe("strahlerOrder()", () => {
  it("orders a hand-made ten-link tree with a triple junction as Strahler's rule says (derived by hand)", () => {
    expect(Array.from(strahlerOrder(networkFromPointers(TEN_LINKS)))).toEqual([2, 2, 1, 1, 1, 1, 1, 1, 2, 3]);
  });
  it("does not raise the order where a lower-order stream joins (Strahler 1957)", () => {
    // 1 and 2 are sources joining 3 (order 2); source 4 joins below at 0: order stays 2
    expect(Array.from(strahlerOrder(networkFromPointers([-1, 3, 3, 0, 0])))).toEqual([2, 1, 1, 2, 1]);
  });
  it("gives the same orders whatever the numbering of the links (invariant)", () => {
    // TEN_LINKS with ids reversed: new id = 9 − old id
    const reversed = TEN_LINKS.map((_, i) => TEN_LINKS[9 - i]).map((d) => (d < 0 ? -1 : 9 - d));
    const order = strahlerOrder(networkFromPointers(reversed));
    expect(Array.from(order).reverse()).toEqual([2, 2, 1, 1, 1, 1, 1, 1, 2, 3]);
  });
  it("refuses a cycle", () => {
    expect(() => strahlerOrder(networkFromPointers([1, 0]))).toThrow(RangeError);
  });
});

describe("strahlerStreams()", () => {
  it("joins links of one order into streams and sums their lengths (derived by hand)", () => {
    const lengths = [2, 3, 1, 1, 1, 1, 1, 1, 5, 7];
    const drops = [1, 1, 0.5, 0.5, 0.5, 0.5, 0.5, 0.5, 2, 1];
    const areas = [10, 6, 1, 1, 1, 1, 1, 1, 4, 20];
    const s = strahlerStreams(networkFromPointers(TEN_LINKS, lengths, drops, areas));
    expect(s.count).toBe(9); // six order-1, two order-2 ({1, 0} and {8}), one order-3
    const stream = s.streamOfLink[0];
    expect(s.streamOfLink[1]).toBe(stream);
    expect(s.order[stream]).toBe(2);
    expect(s.headLink[stream]).toBe(1);
    expect(s.outletLink[stream]).toBe(0);
    expect(s.linkCount[stream]).toBe(2);
    expect(s.lengthM[stream]).toBe(5);
    expect(s.dropM[stream]).toBe(2);
    expect(s.areaM2[stream]).toBe(10); // the area at the stream's downstream end
    expect(Array.from(s.order).sort()).toEqual([1, 1, 1, 1, 1, 1, 2, 2, 3]);
  });
  it("puts every link in exactly one stream and keeps the total length (invariant)", () => {
    const lengths = TEN_LINKS.map((_, i) => 1 + i * 0.5);
    const s = strahlerStreams(networkFromPointers(TEN_LINKS, lengths));
    const linksInStreams = Array.from(s.linkCount).reduce((a, b) => a + b, 0);
    expect(linksInStreams).toBe(TEN_LINKS.length);
    expect(Array.from(s.lengthM).reduce((a, b) => a + b, 0)).toBe(lengths.reduce((a, b) => a + b, 0));
  });
});
