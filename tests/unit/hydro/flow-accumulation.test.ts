import { describe, expect, it } from "vitest";
import { makeGrid } from "@/lib/raster/grid";
import { projectedCellGeometry, type CellGeometry } from "@/lib/raster/cell-geometry";
import { flowAccumulation } from "@/lib/hydro/flow-accumulation";
import { d8Directions } from "@/lib/hydro/d8";
import { resolveFlats } from "@/lib/hydro/flats";
import { priorityFlood } from "@/lib/hydro/priority-flood";
import { NO_FLOW } from "@/lib/hydro/neighbours";
import { expectClose } from "@/tests/helpers/expect-close";
import { flatWithOneOutlet, plane, randomDem } from "@/tests/unit/hydro/dem-fixtures";

/** Per-row geometry whose areas differ by row, as on a geographic grid. */
function rowVaryingGeometry(h: number): CellGeometry {
  const dx = Float64Array.from({ length: h }, (_, y) => 30 - y * 0.1);
  const dy = new Float64Array(h).fill(30);
  return { dx, dy, area: dx.map((v, y) => v * dy[y]), geographic: true };
}

/** Fill, resolve flats, D8 and accumulate: the conditioning chain the pipeline runs. */
function drain(dem: ReturnType<typeof randomDem>, geometry: CellGeometry) {
  priorityFlood(dem);
  const flats = resolveFlats(dem);
  const dir = d8Directions(dem, geometry, { flatIncrements: flats.increments });
  return { dir, acc: flowAccumulation(dir, dem, geometry) };
}

describe("flowAccumulation()", () => {
  it("on a plane draining east gives cell x of each row x + 1 cells and (x + 1)·dx·dy m² (derived)", () => {
    const geometry = projectedCellGeometry(4, 30, 20);
    const dem = plane(7, 4, 0, 30, 20);
    const acc = flowAccumulation(d8Directions(dem, geometry), dem, geometry);
    for (let y = 0; y < 4; y++) {
      for (let x = 0; x < 7; x++) {
        expect(acc.cells[y * 7 + x]).toBe(x + 1);
        expect(acc.areaM2[y * 7 + x]).toBe((x + 1) * 600);
      }
    }
    expect(acc.outlets).toBe(4);
  });

  it("sums to the number of valid cells and their area over the outlets of random DEMs with holes (invariant)", () => {
    for (let seed = 41; seed <= 46; seed++) {
      const geometry = rowVaryingGeometry(37);
      const dem = randomDem(45, 37, seed, 0.06);
      const { dir, acc } = drain(dem, geometry);
      let cellSum = 0, areaSum = 0, validArea = 0, valid = 0;
      for (let i = 0; i < dem.data.length; i++) {
        if (dem.data[i] !== dem.data[i]) {
          expect(acc.cells[i]).toBe(0);
          continue;
        }
        valid++;
        validArea += geometry.area[Math.floor(i / 45)];
        if (dir.data[i] === NO_FLOW) {
          cellSum += acc.cells[i];
          areaSum += acc.areaM2[i];
        }
      }
      expect(acc.validCells).toBe(valid);
      expect(cellSum).toBe(valid);
      expectClose(areaSum, validArea, 1e-6 * validArea);
    }
  });

  it("lists every valid cell once in an order where each cell comes after all its donors (invariant)", () => {
    const geometry = projectedCellGeometry(33, 10, 10);
    const dem = randomDem(27, 33, 51, 0.05);
    const { dir, acc } = drain(dem, geometry);
    const position = new Int32Array(dem.data.length).fill(-1);
    acc.order.forEach((c, p) => (position[c] = p));
    expect(acc.order.length).toBe(acc.validCells);
    const offsets = [1, 28, 27, 26, -1, -28, -27, -26];
    for (let i = 0; i < dem.data.length; i++) {
      if (dem.data[i] !== dem.data[i]) continue;
      expect(position[i]).toBeGreaterThanOrEqual(0);
      const d = dir.data[i];
      if (d !== NO_FLOW) expect(position[i + offsets[d]]).toBeGreaterThan(position[i]);
    }
  });

  it("drains the whole 9×7 flat DEM through its one outlet (Barnes et al. 2014; derived: 63 cells)", () => {
    const geometry = projectedCellGeometry(7, 1, 1);
    const { acc } = drain(flatWithOneOutlet(), geometry);
    expect(acc.outlets).toBe(1);
    expect(acc.cells[3 * 9]).toBe(63);
  });

  it("on a 1×1 DEM gives one outlet of one cell, and on a DEM fully of nodata none (derived)", () => {
    const one = makeGrid(Float32Array.of(2), 1, 1);
    const g1 = projectedCellGeometry(1, 5, 5);
    const acc = flowAccumulation(d8Directions(one, g1), one, g1);
    expect([acc.cells[0], acc.areaM2[0], acc.outlets, acc.order.length]).toEqual([1, 25, 1, 1]);
    const none = makeGrid(new Float32Array(4).fill(NaN), 2, 2);
    const g2 = projectedCellGeometry(2, 5, 5);
    const empty = flowAccumulation(d8Directions(none, g2), none, g2);
    expect([empty.validCells, empty.outlets, empty.order.length]).toEqual([0, 0, 0]);
  });

  it("with the donor counts d8Directions makes gives the same cells, areas, order and outlets (invariant)", () => {
    for (const geometry of [projectedCellGeometry(37, 30, 30), rowVaryingGeometry(37)]) {
      for (let seed = 61; seed <= 64; seed++) {
        const dem = randomDem(45, 37, seed, 0.06);
        priorityFlood(dem);
        const flats = resolveFlats(dem);
        const donors = new Uint8Array(dem.data.length);
        const dir = d8Directions(dem, geometry, { flatIncrements: flats.increments, donors });
        expect(d8Directions(dem, geometry, { flatIncrements: flats.increments }).data).toEqual(dir.data);
        const counted = new Uint8Array(dem.data.length);
        const offsets = [1, 46, 45, 44, -1, -46, -45, -44];
        dir.data.forEach((d, i) => { if (d !== NO_FLOW) counted[i + offsets[d]]++; });
        expect(donors).toEqual(counted);
        const plain = flowAccumulation(dir, dem, geometry);
        const fused = flowAccumulation(dir, dem, geometry, { donors });
        expect(fused.cells).toEqual(plain.cells);
        expect(fused.areaM2).toEqual(plain.areaM2);
        expect(fused.order).toEqual(plain.order);
        expect([fused.outlets, fused.validCells]).toEqual([plain.outlets, plain.validCells]);
      }
    }
  });

  it("in reused arrays holding old values gives the same cells, areas and order, and refuses arrays of the wrong size (invariant)", () => {
    const dem = randomDem(45, 37, 65, 0.06);
    priorityFlood(dem);
    const dir = d8Directions(dem, projectedCellGeometry(37, 30, 30), { flatIncrements: resolveFlats(dem).increments });
    const plain = flowAccumulation(dir, dem, projectedCellGeometry(37, 30, 30));
    const n = dem.data.length;
    const spare: [Int32Array, Int32Array] = [new Int32Array(n).fill(-7), new Int32Array(n).fill(99)];
    const reused = flowAccumulation(dir, dem, projectedCellGeometry(37, 30, 30), { reuse: spare });
    expect(reused.cells).toEqual(plain.cells);
    expect(reused.areaM2).toEqual(plain.areaM2);
    expect(reused.order).toEqual(plain.order);
    expect(reused.cells.buffer).toBe(spare[0].buffer);
    expect(reused.order.buffer).toBe(spare[1].buffer);
    expect(() => flowAccumulation(dir, dem, projectedCellGeometry(37, 30, 30), { reuse: [new Int32Array(n - 1), new Int32Array(n)] })).toThrow(RangeError);
    const one = new Int32Array(n);
    expect(() => flowAccumulation(dir, dem, projectedCellGeometry(37, 30, 30), { reuse: [one, one] })).toThrow(RangeError);
  });

  it("rejects directions that form a cycle, leave the grid or enter nodata", () => {
    const g = projectedCellGeometry(1, 1, 1);
    const dem = makeGrid(Float32Array.of(1, 1, NaN), 3, 1);
    const cycle = makeGrid(Uint8Array.of(0, 4, NO_FLOW), 3, 1);
    expect(() => flowAccumulation(cycle, dem, g)).toThrow(/cycle through 2 cells/);
    const offGrid = makeGrid(Uint8Array.of(4, NO_FLOW, NO_FLOW), 3, 1);
    expect(() => flowAccumulation(offGrid, dem, g)).toThrow(/off the grid/);
    const intoHole = makeGrid(Uint8Array.of(NO_FLOW, 0, NO_FLOW), 3, 1);
    expect(() => flowAccumulation(intoHole, dem, g)).toThrow(/into nodata/);
    const badCode = makeGrid(Uint8Array.of(9, NO_FLOW, NO_FLOW), 3, 1);
    expect(() => flowAccumulation(badCode, dem, g)).toThrow(/code 9/);
  });
});
