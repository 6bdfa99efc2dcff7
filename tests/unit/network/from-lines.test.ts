import { describe, expect, test } from "vitest";
import { networkFromLines, type FromLinesOptions } from "@/lib/network/from-lines";
import { topologicalOrder } from "@/lib/network/model";
import { WGS84_A } from "@/lib/raster/wgs84";
import { expectClose } from "@/tests/helpers/expect-close";

const UTM32 = "+proj=utm +zone=32 +datum=WGS84 +units=m +no_defs";
const X0 = 500000, Y0 = 5000000;
/** a polyline from offsets in metres around (X0, Y0) */
const L = (...xy: number[]) => Float64Array.from(xy, (v, i) => v + (i % 2 === 0 ? X0 : Y0));
const reversed = (l: Float64Array) => {
  const out = new Float64Array(l.length);
  for (let i = 0; i < l.length; i += 2) { out[l.length - 2 - i] = l[i]; out[l.length - 1 - i] = l[i + 1]; }
  return out;
};
const base: FromLinesOptions = { crs: UTM32, snapToleranceM: 1, dangleLengthM: 0, components: "each", outlet: { x: X0, y: Y0, radiusM: 10 } };

/** Two sources joining at (0,200) then a 200 m stem to the outlet at (0,0), and a tributary into the stem at (0,100). */
const tree = () => [
  L(0, 200, 0, 100, 0, 0),
  L(-100, 300, 0, 200),
  L(100, 300, 0, 200),
  L(60, 100, 0, 100),
];

/** Links as sorted strings of rounded paths and downstream paths, to compare networks built differently. */
function signature(links: { path: Float64Array; downstream: number }[]): string[] {
  const key = (p: Float64Array) => Array.from(p, (v) => v.toFixed(3)).join(",");
  return links.map((l) => `${key(l.path)} -> ${l.downstream >= 0 ? key(links[l.downstream].path) : "outlet"}`).sort();
}

describe("networkFromLines()", () => {
  test("a tree of four lines gives five links with Euclidean lengths and one outlet (derived)", () => {
    const { network, report } = networkFromLines(tree(), base);
    expect(network.links).toHaveLength(5);
    expect(network.links.filter((l) => l.downstream === -1)).toHaveLength(1);
    expect(() => topologicalOrder(network)).not.toThrow();
    const lengths = network.links.map((l) => l.lengthM).sort((a, b) => a - b);
    // derived: 60, 100, 100, 100√2 (twice)
    [60, 100, 100, 100 * Math.SQRT2, 100 * Math.SQRT2].forEach((v, i) => expectClose(lengths[i], v, 1e-9));
    expect(report.midLineJunctions).toBe(1);
    expectClose(report.networkLengthM, 260 + 200 * Math.SQRT2, 1e-9);
    expect(report.outlets[0].rule).toBe("point");
  });

  test("endpoints 0.5 m apart join with a 1 m tolerance and stay apart with 0.1 m (derived)", () => {
    const lines = [L(0, 100, 0, 0), L(0.5, 200, 0.3, 100.4)];
    const joined = networkFromLines(lines, base);
    expect(joined.report.components.count).toBe(1);
    expect(joined.report.snappedEndpoints).toBe(1);
    const apart = networkFromLines(lines, { ...base, snapToleranceM: 0.1 });
    expect(apart.report.components.count).toBe(2);
  });

  test("reversing the digitisation of every line changes no link and counts every piece as reversed (invariant)", () => {
    const a = networkFromLines(tree(), base);
    const b = networkFromLines(tree().map(reversed), base);
    expect(signature(b.network.links)).toEqual(signature(a.network.links));
    expect(a.report.reversedPieces).toBe(0);
    expect(b.report.reversedPieces).toBe(a.report.pieces);
  });

  test("shuffling the line order gives identical links with identical ids (invariant)", () => {
    const a = networkFromLines(tree(), base);
    const lines = tree();
    const b = networkFromLines([lines[3], lines[1], lines[0], lines[2]], base);
    expect(b.network.links.map((l) => [l.downstream, Array.from(l.path)])).toEqual(a.network.links.map((l) => [l.downstream, Array.from(l.path)]));
  });

  test("splitting a line into two pieces at a vertex changes no link (invariant)", () => {
    const lines = tree();
    const split = [L(0, 200, 0, 150), L(0, 150, 0, 100, 0, 0), ...lines.slice(1)];
    const withVertex = [L(0, 200, 0, 150, 0, 100, 0, 0), ...lines.slice(1)];
    expect(signature(networkFromLines(split, base).network.links)).toEqual(signature(networkFromLines(withVertex, base).network.links));
  });

  test("one braid is analysed as a tree and the longer channel is reported with its location (derived)", () => {
    // a side channel leaves the stem at (0,150) and rejoins it at (0,50): 10 + 100 + 10 m long
    const lines = [...tree(), L(0, 150, -10, 150, -10, 50, 0, 50)];
    const { network, report } = networkFromLines(lines, base);
    expect(report.loops.count).toBe(1);
    expectClose(report.loops.removedLengthM, 120, 1e-9);
    const loc = report.loops.locations[0];
    expectClose(loc.x - X0, -10, 1e-9);
    expect(loc.lat).toBeGreaterThan(45);
    expect(() => topologicalOrder(network)).not.toThrow();
    expectClose(report.networkLengthM, 260 + 200 * Math.SQRT2, 1e-9);
  });

  test("a 3 m overshoot past a junction is dropped as a dangle and counted (derived)", () => {
    const lines = [...tree(), L(0, 200, 0, 203)];
    const kept = networkFromLines(lines, base);
    expect(kept.network.links).toHaveLength(6); // the overshoot is a third source at the junction
    const { network, report } = networkFromLines(lines, { ...base, dangleLengthM: 5 });
    expect(report.dangles.dropped).toBe(1);
    expectClose(report.dangles.lengthM, 3, 1e-9);
    expect(network.links).toHaveLength(5);
  });

  test("two separate trees are both analysed with 'each' and only the longer with 'largest' (derived)", () => {
    const other = L(5000, 100, 5000, 0);
    const each = networkFromLines([...tree(), other], { ...base, outlet: undefined });
    expect(each.report.components).toMatchObject({ count: 2, analysed: 2 });
    expect(each.network.links.filter((l) => l.downstream === -1)).toHaveLength(2);
    const largest = networkFromLines([...tree(), other], { ...base, outlet: undefined, components: "largest" });
    expect(largest.report.components.analysed).toBe(1);
    expectClose(largest.report.components.droppedLengthM, 100, 1e-9);
    expect(largest.network.links).toHaveLength(5);
  });

  test("without an outlet the end that leaves no line reversed is chosen, or the lowest end with elevations (derived)", () => {
    const digitised = networkFromLines(tree(), { ...base, outlet: undefined });
    expect(digitised.report.outlets[0]).toMatchObject({ x: X0, y: Y0, rule: "digitising" });
    // z = x − y makes (−100, 300) the lowest end (z = −400)
    const lowest = networkFromLines(tree(), { ...base, outlet: undefined, elevationAt: (x, y) => (x - X0) - (y - Y0) });
    expect(lowest.report.outlets[0]).toMatchObject({ x: X0 - 100, y: Y0 + 300, rule: "lowest-end" });
    const outletLink = lowest.network.links.find((l) => l.downstream === -1)!;
    expectClose(outletLink.dropM, -200 - -400, 1e-9); // from the junction (0, 200) down to (−100, 300)
  });

  test("two lines digitised into one point with nothing below it meet at an outlet instead of being joined (derived)", () => {
    const { network, report } = networkFromLines([L(-100, 100, 0, 0), L(100, 100, 0, 0)], { ...base, outlet: undefined });
    expect(network.links).toHaveLength(2);
    expect(network.links.every((l) => l.downstream === -1)).toBe(true);
    expect(report.outlets[0]).toMatchObject({ x: X0, y: Y0, rule: "digitising" });
    expect(report.reversedPieces).toBe(0);
  });

  test("a downstream-id attribute finds the outlet even when the lines are digitised upstream (derived)", () => {
    const lines = tree().map(reversed);
    const downstreamOf = Int32Array.from([-1, 0, 0, 0]);
    const { report } = networkFromLines(lines, { ...base, outlet: undefined, orientation: { kind: "downstream-line", downstreamOf } });
    expect(report.outlets[0]).toMatchObject({ x: X0, y: Y0 });
    expect(report.attributeConflicts).toBe(0);
  });

  test("a tributary ending on a 1000 km diagonal segment splits it where it touches (regression: hashing segments by bounding box)", () => {
    const long = L(0, 0, 707107, 707107);
    const trib = L(350000 - 300, 350000 + 300, 350000 + 0.2, 350000 - 0.2);
    const { network, report } = networkFromLines([long, trib], { ...base, outlet: { x: X0, y: Y0, radiusM: 10 } });
    expect(report.midLineJunctions).toBe(1);
    expect(network.links).toHaveLength(3);
    expectClose(report.networkLengthM, 1e6 + Math.hypot(300.2, 300.2), 1); // the split moves the line by < 0.2 m (derived)
  });

  test("on longitude/latitude, one degree along the equator is a·π/180 = 111 319.49 m long (derived, WGS84)", () => {
    const { network } = networkFromLines([Float64Array.from([0, 0, 0.5, 0, 1, 0])], {
      crs: "+proj=longlat +datum=WGS84 +no_defs", snapToleranceM: 1, dangleLengthM: 0, components: "each",
    });
    expectClose(network.links[0].lengthM, (WGS84_A * Math.PI) / 180, 1e-6);
  });

  test("an outlet farther than its radius from every node is refused with the distance (derived)", () => {
    expect(() => networkFromLines(tree(), { ...base, outlet: { x: X0 + 500, y: Y0, radiusM: 50 } })).toThrow(/451 m .* 50 m/); // nearest node (60, 100): √(440² + 100²) = 451 m;
  });
});
