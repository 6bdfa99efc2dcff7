import { describe, expect, it } from "vitest";
import { networkFromRaster, paintLinks } from "@/lib/network/from-raster";
import { strahlerOrder } from "@/lib/network/strahler";
import { expectClose } from "@/tests/helpers/expect-close";
import { Y_GRID } from "./raster-grids";

describe("networkFromRaster()", () => {
  it("makes two source links meeting at a junction and one outlet link on a hand-made grid (derived by hand)", () => {
    const { network, startCell, endCell } = networkFromRaster({ ...Y_GRID, thresholdM2: 150 });
    expect(Array.from(startCell)).toEqual([6, 8, 12]);
    expect(Array.from(endCell)).toEqual([12, 12, 17]);
    const [a, b, c] = network.links;
    expect([a.downstream, b.downstream, c.downstream]).toEqual([2, 2, -1]);
    expectClose(a.lengthM, Math.SQRT2 * 10, 1e-12); // one diagonal step of 10 m × 10 m cells
    expect(c.lengthM).toBe(10);
    expect(a.dropM).toBe(8 - 5);
    expect(b.dropM).toBe(7 - 5);
    expect(c.dropM).toBe(1);
    expect(a.areaM2).toBe(200); // the link's own basin, before the other inflow joins
    expect(c.areaM2).toBe(600);
    expect(Array.from(a.path)).toEqual([1015, 1985, 1025, 1975]); // cell centres in CRS units
    expect(Array.from(strahlerOrder(network))).toEqual([1, 1, 2]);
  });
  it("extends the sources upstream when the threshold falls (derived by hand)", () => {
    const { network } = networkFromRaster({ ...Y_GRID, thresholdM2: 100 });
    // every cell is now a channel: isolated cells become one-cell links; (1,0) and (3,0) start the sources
    const source = network.links.find((l) => l.path[0] === 1015 && l.path[1] === 1995)!;
    expectClose(source.lengthM, 10 + Math.SQRT2 * 10, 1e-12);
    expect(network.links.filter((l) => l.downstream < 0 && l.lengthM > 0)).toHaveLength(1);
  });
  it("puts every channel cell on exactly one link (invariant)", () => {
    const raster = networkFromRaster({ ...Y_GRID, thresholdM2: 150 });
    const painted = new Int32Array(20);
    paintLinks(raster, Y_GRID.directions, raster.network.links.map((l) => l.id + 1), painted);
    expect(Array.from(painted).filter((v) => v > 0)).toHaveLength(4);
    expect(painted[12]).toBe(3); // the junction takes the link that starts there
    expect(painted[6]).toBe(1);
  });
  it("refuses a non-positive threshold", () => {
    expect(() => networkFromRaster({ ...Y_GRID, thresholdM2: 0 })).toThrow(RangeError);
  });
});

describe("networkFromRaster() with break cells", () => {
  it("ends a link at a chosen outlet cell and gives it that cell's area (derived by hand)", () => {
    // break the left source's link at cell (1, 1) = 6, between (1, 0) and the junction (2, 2)
    const plain = networkFromRaster({ ...Y_GRID, thresholdM2: 100 });
    const broken = networkFromRaster({ ...Y_GRID, thresholdM2: 100, breakCells: Int32Array.of(6) });
    expect(broken.network.links).toHaveLength(plain.network.links.length + 1);
    const upper = broken.network.links.find((l) => l.path[0] === 1015 && l.path[1] === 1995)!;
    expect(upper.lengthM).toBe(10); // (1,0) → (1,1), then the break
    expect(upper.areaM2).toBe(200); // the area of the break cell, the basin's outlet
    const lower = broken.network.links[upper.downstream];
    expectClose(lower.lengthM, Math.SQRT2 * 10, 1e-12);
  });
});

describe("networkFromRaster() with flow lengths", () => {
  it("gives each link the flow length of its area cell as its main-stream length", () => {
    const flowLengthM = Float32Array.from({ length: 20 }, (_, i) => i * 2);
    const { network } = networkFromRaster({ ...Y_GRID, thresholdM2: 150, flowLengthM });
    expect(network.links.map((l) => l.mainStreamLengthM)).toEqual([12, 16, 34]); // cells 6, 8 and 17
  });
});
