import { describe, expect, it } from "vitest";
import { constantDropThreshold, dropTTest, logSpacedThresholds } from "@/lib/hydro/constant-drop";
import { expectClose } from "@/tests/helpers/expect-close";
import { networkFromPointers, TEN_LINKS } from "../network/small-trees";

// TEN_LINKS: order-1 links 2–7 (each its own stream); order-2 streams {1, 0} and {8}; order 3 {9}.
function tenLinksWithDrops(order1Drop: (i: number) => number, higher: [number, number, number, number]) {
  const drops = TEN_LINKS.map((_, i) => (i >= 2 && i <= 7 ? order1Drop(i) : 0));
  [drops[0], drops[1], drops[8], drops[9]] = higher;
  return networkFromPointers(TEN_LINKS, undefined, drops);
}

describe("dropTTest()", () => {
  it("gives the pooled t = −3/√(10/9) = −2.846050 on 3 df for drops {1,2,3} vs {4,6} (derived by hand)", () => {
    const t = dropTTest([1, 2, 3], [4, 6], "pooled");
    expectClose(t.t, -3 / Math.sqrt(10 / 9), 1e-12);
    expect(t.df).toBe(3);
  });
  it("gives Welch's t = −3/√(4/3) and df = 32/19 on the same drops (derived by hand; Welch 1947)", () => {
    const t = dropTTest([1, 2, 3], [4, 6], "welch");
    expectClose(t.t, -3 / Math.sqrt(4 / 3), 1e-12);
    expectClose(t.df, 32 / 19, 1e-12);
    expect(t.pValue).toBeGreaterThan(0);
    expect(t.pValue).toBeLessThan(1);
  });
  it("is antisymmetric in its samples (invariant)", () => {
    const a = [0.5, 2, 2.5, 7], b = [3, 1, 4, 1, 5];
    expectClose(dropTTest(a, b, "welch").t, -dropTTest(b, a, "welch").t, 1e-12);
  });
  it("returns NaN, not a crash, for a sample of one stream", () => {
    expect(dropTTest([1], [2, 3], "pooled").t).toBeNaN();
  });
});

describe("constantDropThreshold()", () => {
  it("chooses the smallest threshold whose order-1 streams drop like the higher orders, with every t shown (Tarboton et al. 1991; |t| < 2 from memory)", () => {
    // at 100 m² the six order-1 streams drop 1 m each ±0.1 while the three higher ones drop 4–6 m: fails;
    // at 200 m² and 400 m² both groups average 5 m: passes. The answer is 200 m².
    const steep = tenLinksWithDrops((i) => 1 + (i % 2 ? 0.1 : -0.1), [2, 2, 5, 6]);
    const even = tenLinksWithDrops((i) => 5 + (i % 2 ? 1 : -1), [2, 2, 4, 7]);
    const result = constantDropThreshold((a) => (a < 150 ? steep : even), { thresholdsM2: [400, 100, 200], variance: "pooled" });
    expect(result.chosenThresholdM2).toBe(200);
    expect(result.candidates.map((c) => c.thresholdM2)).toEqual([100, 200, 400]);
    const [first, second] = result.candidates;
    expect(first.passes).toBe(false);
    expect(first.order1Streams).toBe(6);
    expect(first.higherOrderStreams).toBe(3);
    expectClose(first.order1MeanDropM, 1, 1e-12);
    expectClose(first.higherMeanDropM, 5, 1e-12); // streams {1,0}: 4, {8}: 5, {9}: 6
    expectClose(second.t, 0, 1e-12);
    expect(second.df).toBe(7);
  });
  it("reports no choice when every candidate fails", () => {
    const steep = tenLinksWithDrops(() => 1, [2, 2, 5, 6]);
    const r = constantDropThreshold(() => steep, { thresholdsM2: [10, 20], variance: "welch" });
    expect(r.chosenThresholdM2).toBeNull();
    expect(r.candidates).toHaveLength(2);
  });
  it("refuses an empty candidate list", () => {
    expect(() => constantDropThreshold(() => networkFromPointers([-1]), { thresholdsM2: [] })).toThrow(RangeError);
  });
});

describe("logSpacedThresholds()", () => {
  it("spaces candidates evenly in log and keeps both ends (derived)", () => {
    const t = logSpacedThresholds(1e4, 1e6, 3);
    expectClose(t[0], 1e4, 1e-9);
    expectClose(t[1], 1e5, 1e-6);
    expectClose(t[2], 1e6, 1e-4);
  });
});
