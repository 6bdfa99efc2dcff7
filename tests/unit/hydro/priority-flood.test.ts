import { describe, expect, it } from "vitest";
import { makeGrid, type Grid } from "@/lib/raster/grid";
import { gridOf, randomDem, seededRandom } from "@/tests/unit/hydro/dem-fixtures";
import { nextUpFloat32, priorityFlood } from "@/lib/hydro/priority-flood";
import { D8_DX, D8_DY } from "@/lib/hydro/neighbours";

/** True when every valid cell that is not on the edge or next to nodata has a neighbour that is lower
 *  (strict) or not higher (non-strict). */
function everyInteriorCellHasOutflow(grid: Grid<Float32Array>, strict: boolean): boolean {
  const { data: z, width: w, height: h } = grid;
  for (let y = 0; y < h; y++) {
    for (let x = 0; x < w; x++) {
      const zc = z[y * w + x];
      if (zc !== zc || x === 0 || y === 0 || x === w - 1 || y === h - 1) continue;
      let outlet = false, down = false;
      for (let k = 0; k < 8; k++) {
        const zn = z[(y + D8_DY[k]) * w + x + D8_DX[k]];
        if (zn !== zn) outlet = true;
        else if (strict ? zn < zc : zn <= zc) down = true;
      }
      if (!outlet && !down) return false;
    }
  }
  return true;
}

describe("priorityFlood()", () => {
  it("fills the 7×5 nested-depression DEM of METHODS.md exactly as listed (derived; Barnes et al. 2014)", () => {
    const dem = gridOf([
      [8, 8, 8, 8, 8, 8, 8],
      [8, 3, 3, 8, 4, 4, 8],
      [8, 3, 1, 6, 4, 2, 8],
      [8, 3, 3, 8, 4, 4, 8],
      [8, 8, 8, 8, 8, 5, 8],
    ]);
    const stats = priorityFlood(dem);
    expect(Array.from(dem.data)).toEqual([
      [8, 8, 8, 8, 8, 8, 8],
      [8, 6, 6, 8, 5, 5, 8],
      [8, 6, 6, 6, 5, 5, 8],
      [8, 6, 6, 8, 5, 5, 8],
      [8, 8, 8, 8, 8, 5, 8],
    ].flat());
    // 6 cells of the left depression and 6 of the right one are raised; the deepest by 6 − 1 = 5 (derived)
    expect(stats.cellsRaised).toBe(12);
    expect(stats.maxRaise).toBe(5);
    expect(stats.validCells).toBe(35);
    expect(stats.seedCells).toBe(20); // 2·7 + 2·3 edge cells (derived)
  });

  it("fills the 7×5 DEM shifted 10 m below zero to the listed values minus 10 (derived: the queue orders negative heights)", () => {
    const rows = [
      [8, 8, 8, 8, 8, 8, 8],
      [8, 3, 3, 8, 4, 4, 8],
      [8, 3, 1, 6, 4, 2, 8],
      [8, 3, 3, 8, 4, 4, 8],
      [8, 8, 8, 8, 8, 5, 8],
    ];
    const dem = gridOf(rows.map((r) => r.map((v) => v - 10)));
    priorityFlood(dem);
    const filled = [
      [8, 8, 8, 8, 8, 8, 8],
      [8, 6, 6, 8, 5, 5, 8],
      [8, 6, 6, 6, 5, 5, 8],
      [8, 6, 6, 8, 5, 5, 8],
      [8, 8, 8, 8, 8, 5, 8],
    ];
    expect(Array.from(dem.data)).toEqual(filled.flat().map((v) => v - 10));
  });

  it("fills a pit at −1 m behind a −0 rim to 0, treating −0 and +0 as one height (IEEE 754: −0 = +0)", () => {
    const dem = gridOf([
      [-0, 0, -0, 0],
      [0, -1, 0.5, -0],
      [-0, 0, -0, 0],
    ]);
    const stats = priorityFlood(dem);
    expect(stats.cellsRaised).toBe(1);
    expect(dem.data[5] === 0).toBe(true); // raised to the rim, whichever zero it carries
    expect(dem.data[6]).toBe(0.5);
  });

  it("leaves a DEM without depressions unchanged (derived)", () => {
    const dem = gridOf([
      [5, 4, 3],
      [4, 3, 2],
      [3, 2, 1],
    ]);
    const before = Array.from(dem.data);
    expect(priorityFlood(dem).cellsRaised).toBe(0);
    expect(Array.from(dem.data)).toEqual(before);
  });

  it("treats cells next to nodata as outlets, so a pit beside a hole is not filled (Barnes et al. 2014)", () => {
    const dem = gridOf([
      [9, 9, 9, 9, 9],
      [9, 2, 1, NaN, 9],
      [9, 9, 9, 9, 9],
    ]);
    priorityFlood(dem);
    expect(Array.from(dem.data.subarray(5, 10))).toEqual([9, 2, 1, NaN, 9]);
  });

  it("on random DEMs with holes never lowers a cell, keeps nodata and leaves no interior pit (invariant)", () => {
    for (let seed = 1; seed <= 5; seed++) {
      const dem = randomDem(37, 23, seed, 0.05);
      const before = Float32Array.from(dem.data);
      priorityFlood(dem);
      for (let i = 0; i < before.length; i++) {
        if (before[i] !== before[i]) expect(dem.data[i]).toBeNaN();
        else expect(dem.data[i]).toBeGreaterThanOrEqual(before[i]);
      }
      expect(everyInteriorCellHasOutflow(dem, false)).toBe(true);
    }
  });

  it("fills heights spread over ±10⁶ m, both signs, to the lowest-spill surface of an iterated relaxation (derived)", () => {
    // The fill is the least, over paths to the edge or to nodata, of the highest cell on the path
    // (Barnes et al. 2014, §1): relaxing W = max(z, min W of the neighbours) from the outlets reaches it.
    // Heights from −10⁶ to 10⁶ with many repeats exercise every digit of the queue's keys and −0.
    for (let seed = 41; seed <= 44; seed++) {
      const w = 31, h = 23, rnd = seededRandom(seed);
      const z = new Float32Array(w * h);
      for (let i = 0; i < z.length; i++) {
        const r = rnd();
        z[i] = r < 0.03 ? NaN : r < 0.1 ? -0 : Math.round((rnd() - 0.5) * 2e6 * rnd() ** 4) / 4;
      }
      const W = Float64Array.from(z, (v) => (Number.isNaN(v) ? NaN : Infinity));
      const outlet = (x: number, y: number) => {
        if (x === 0 || y === 0 || x === w - 1 || y === h - 1) return true;
        for (let k = 0; k < 8; k++) if (Number.isNaN(z[(y + D8_DY[k]) * w + x + D8_DX[k]])) return true;
        return false;
      };
      for (let y = 0; y < h; y++) for (let x = 0; x < w; x++) if (outlet(x, y)) W[y * w + x] = z[y * w + x];
      for (let sweep = 0, changed = true; changed && sweep < w * h; sweep++) {
        changed = false;
        for (let y = 1; y < h - 1; y++) {
          for (let x = 1; x < w - 1; x++) {
            const i = y * w + x;
            if (Number.isNaN(z[i]) || outlet(x, y)) continue;
            let low = Infinity;
            for (let k = 0; k < 8; k++) {
              const j = (y + D8_DY[k]) * w + x + D8_DX[k];
              if (!Number.isNaN(W[j])) low = Math.min(low, W[j]);
            }
            const v = Math.max(z[i], low);
            if (v < W[i]) {
              W[i] = v;
              changed = true;
            }
          }
        }
      }
      const dem = makeGrid(z, w, h);
      priorityFlood(dem);
      for (let i = 0; i < z.length; i++) {
        if (Number.isNaN(W[i])) expect(dem.data[i]).toBeNaN();
        else expect(dem.data[i] === W[i], `cell ${i}: ${dem.data[i]} vs ${W[i]}`).toBe(true);
      }
    }
  });

  it("marks every flat cell it leaves among its flat candidates, and fills as without them, on random DEMs with holes (invariant)", () => {
    for (let seed = 21; seed <= 26; seed++) {
      const dem = randomDem(39, 27, seed, 0.04);
      const plain = makeGrid(Float32Array.from(dem.data), 39, 27);
      const candidates = new Int32Array((39 * 27 + 31) >>> 5);
      priorityFlood(dem, { flatCandidates: candidates });
      priorityFlood(plain);
      expect(Array.from(dem.data)).toEqual(Array.from(plain.data));
      const z = dem.data;
      let flat = 0, marked = 0;
      for (let y = 1; y < 26; y++) {
        for (let x = 1; x < 38; x++) {
          const i = y * 39 + x;
          let isFlat = z[i] === z[i];
          for (let k = 0; k < 8; k++) if (!(z[(y + D8_DY[k]) * 39 + x + D8_DX[k]] >= z[i])) isFlat = false;
          if (!isFlat) continue;
          flat++;
          if ((candidates[i >> 5] & (1 << (i & 31))) !== 0) marked++;
        }
      }
      expect(flat).toBeGreaterThan(0);
      expect(marked).toBe(flat);
    }
  });

  it("rejects a flat-candidate set of the wrong size (derived: one bit a cell)", () => {
    expect(() => priorityFlood(randomDem(40, 2, 1, 0), { flatCandidates: new Int32Array(2) })).toThrow(RangeError);
  });

  it("with epsilon leaves a strictly draining surface on random DEMs with holes (Barnes et al. 2014, Algorithm 3)", () => {
    for (let seed = 11; seed <= 15; seed++) {
      const dem = randomDem(41, 29, seed, 0.03);
      const stats = priorityFlood(dem, { epsilon: true });
      expect(stats.cellsRaised).toBeGreaterThan(0);
      expect(everyInteriorCellHasOutflow(dem, true)).toBe(true);
    }
  });

  it("with epsilon fills the 7×5 DEM to within a few Float32 steps above the exact fill (derived)", () => {
    const dem = gridOf([
      [8, 8, 8, 8, 8, 8, 8],
      [8, 3, 3, 8, 4, 4, 8],
      [8, 3, 1, 6, 4, 2, 8],
      [8, 3, 3, 8, 4, 4, 8],
      [8, 8, 8, 8, 8, 5, 8],
    ]);
    priorityFlood(dem, { epsilon: true });
    // the outlet cell (5, 4) at 5 floods (5, 3) to nextUp(5); the spill cell (3, 2) stays at 6
    expect(dem.data[3 * 7 + 5]).toBe(nextUpFloat32(5));
    expect(dem.data[2 * 7 + 3]).toBe(6);
    for (const i of [8, 9, 15, 16, 22, 23]) {
      expect(dem.data[i]).toBeGreaterThan(6);
      expect(dem.data[i] - 6).toBeLessThan(1e-5);
    }
  });

  it("on a DEM fully of nodata does nothing and reports no valid cells (derived)", () => {
    const dem = makeGrid(new Float32Array(12).fill(NaN), 4, 3);
    const stats = priorityFlood(dem);
    expect(stats.validCells).toBe(0);
    expect(stats.seedCells).toBe(0);
    expect(Array.from(dem.data).every(Number.isNaN)).toBe(true);
  });

  it("on a 1×1 DEM seeds the one cell and changes nothing (derived)", () => {
    const dem = makeGrid(Float32Array.of(3), 1, 1);
    const stats = priorityFlood(dem);
    expect(stats).toMatchObject({ validCells: 1, seedCells: 1, cellsRaised: 0 });
    expect(dem.data[0]).toBe(3);
  });
});

describe("priorityFlood() without slope tracing", () => {
  it("fills random DEMs with holes to the same surface as with it (invariant; Zhou et al. 2016)", () => {
    for (let seed = 21; seed <= 25; seed++) {
      const a = randomDem(53, 31, seed, 0.04);
      const b = { ...a, data: Float32Array.from(a.data) };
      const traced = priorityFlood(a);
      const plain = priorityFlood(b, { traceSlopes: false });
      expect(traced.slopeTracedCells).toBeGreaterThan(0);
      expect(plain.slopeTracedCells).toBe(0);
      expect(Array.from(a.data)).toEqual(Array.from(b.data));
    }
  });
});

describe("nextUpFloat32()", () => {
  it("steps 1 to 1 + 2⁻²³, −1 to −1 + 2⁻²⁴ and 0 to the smallest subnormal 2⁻¹⁴⁹ (IEEE 754 binary32)", () => {
    expect(nextUpFloat32(1)).toBe(1 + 2 ** -23);
    expect(nextUpFloat32(-1)).toBe(-1 + 2 ** -24);
    expect(nextUpFloat32(0)).toBe(2 ** -149);
    expect(nextUpFloat32(-0)).toBe(2 ** -149);
    expect(nextUpFloat32(Infinity)).toBe(Infinity);
  });
});
