import { describe, expect, it } from "vitest";
import { basinLabels, NO_BASIN, outletLinksBySize, snapOutlet, subNetwork } from "@/lib/network/basins";
import { Y_GRID } from "./raster-grids";
import { networkFromPointers } from "./small-trees";

describe("basinLabels()", () => {
  it("labels the six cells above the outlet of the hand-made grid and nothing else (derived by hand)", () => {
    const labels = basinLabels(Y_GRID.directions, [17]);
    expect([1, 3, 6, 8, 12, 17].every((c) => labels[c] === 1)).toBe(true);
    expect(Array.from(labels).filter((v) => v === NO_BASIN)).toHaveLength(14);
  });
  it("gives each outlet its own label (invariant: labels sum to the cells above each outlet)", () => {
    const labels = basinLabels(Y_GRID.directions, [17, 0]);
    expect(Array.from(labels).filter((v) => v === 1)).toHaveLength(6);
    expect(Array.from(labels).filter((v) => v === 2)).toHaveLength(1);
  });
});

describe("snapOutlet()", () => {
  it("moves a point beside the channel onto the cell of largest area within the radius (common practice)", () => {
    const { areaM2, width, height, transform, cellGeometry } = Y_GRID;
    // the centre of cell (3, 3) is 10 m east of the outlet (2, 3)
    expect(snapOutlet(areaM2, width, height, transform, cellGeometry, 1035, 1965, 12)).toBe(17);
    // with a 5 m radius only the cell itself qualifies
    expect(snapOutlet(areaM2, width, height, transform, cellGeometry, 1035, 1965, 5)).toBe(18);
  });
  it("refuses a point outside the grid", () => {
    const { areaM2, width, height, transform, cellGeometry } = Y_GRID;
    expect(() => snapOutlet(areaM2, width, height, transform, cellGeometry, 0, 0, 10)).toThrow(RangeError);
  });
});

describe("outletLinksBySize() and subNetwork()", () => {
  // two trees: 0 ← 1, 2 (area 30) and 3 ← 4 (area 50)
  const network = networkFromPointers([-1, 0, 0, -1, 3], undefined, undefined, [30, 10, 10, 50, 20]);
  it("lists outlets largest first", () => {
    expect(outletLinksBySize(network)).toEqual([3, 0]);
  });
  it("keeps the links of the chosen basins, renumbered, with their downstream pointers (derived)", () => {
    const sub = subNetwork(network, [0]);
    expect(Array.from(sub.originalId)).toEqual([0, 1, 2]);
    expect(sub.network.links.map((l) => l.downstream)).toEqual([-1, 0, 0]);
    const big = subNetwork(network, [3]);
    expect(big.network.links.map((l) => [l.id, l.downstream])).toEqual([[0, -1], [1, 0]]);
  });
  it("refuses a link that is not an outlet", () => {
    expect(() => subNetwork(network, [1])).toThrow(RangeError);
  });
});
