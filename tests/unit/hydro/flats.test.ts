import { describe, expect, it } from "vitest";
import { resolveFlats } from "@/lib/hydro/flats";
import { priorityFlood } from "@/lib/hydro/priority-flood";
import { D8_DX, D8_DY } from "@/lib/hydro/neighbours";
import { flatWithOneOutlet, gridOf, randomDem } from "@/tests/unit/hydro/dem-fixtures";

describe("resolveFlats()", () => {
  // The 9×7 DEM: interior cells x 1..7, y 1..5 level at 5 m, outlet (0, 3) at 5 m in a 9 m rim.
  // Steps towards lower terrain = max(x, |y − 3|) (8-connected distance to the outlet); steps from higher
  // terrain = 1 + min(x − 1, 7 − x, y − 1, 5 − y) (distance to the rim), largest 3; increment =
  // 2·towards + (3 − away) (Barnes et al. 2014, derived for this DEM).
  it("gives the 9×7 flat with one outlet the increments 2·towards + (max away − away) (derived; Barnes et al. 2014)", () => {
    const dem = flatWithOneOutlet();
    const before = Float32Array.from(dem.data);
    const r = resolveFlats(dem);
    expect(Array.from(dem.data)).toEqual(Array.from(before));
    for (let y = 0; y < 7; y++) {
      for (let x = 0; x < 9; x++) {
        const interior = x >= 1 && x <= 7 && y >= 1 && y <= 5;
        const towards = Math.max(x, Math.abs(y - 3));
        const away = 1 + Math.min(x - 1, 7 - x, y - 1, 5 - y);
        expect(r.increments[y * 9 + x], `cell (${x}, ${y})`).toBe(interior ? 2 * towards + 3 - away : 0);
      }
    }
    expect(r).toMatchObject({ flatCells: 35, flats: 1, unresolvedFlats: 0, unresolvedCells: 0, maxIncrement: 16 });
  });

  it("gives the increments of a plain breadth-first reading of Barnes et al. (2014) on random DEMs with holes and wide flats (derived)", () => {
    for (let seed = 41; seed <= 48; seed++) {
      const dem = randomDem(47, 33, seed, 0.03);
      // coarse steps make wide plateaus and pits, besides the flats of the fill
      if (seed % 2 === 0) dem.data.forEach((v, i) => { dem.data[i] = Math.round(v / 25) * 25; });
      priorityFlood(dem);
      const expected = referenceIncrements(dem.data, 47, 33);
      const { increments, flatCells } = resolveFlats(dem);
      expect(flatCells).toBeGreaterThan(0);
      expect(Array.from(increments)).toEqual(Array.from(expected));
    }
  });

  it("gives every cell of a resolved flat a neighbour of equal elevation with a smaller increment (invariant)", () => {
    for (let seed = 31; seed <= 36; seed++) {
      const dem = randomDem(40, 30, seed, 0.03);
      priorityFlood(dem);
      const { increments, flatCells, unresolvedFlats } = resolveFlats(dem);
      expect(flatCells).toBeGreaterThan(0);
      expect(unresolvedFlats).toBe(0);
      const z = dem.data;
      for (let y = 1; y < 29; y++) {
        for (let x = 1; x < 39; x++) {
          const i = y * 40 + x;
          if (increments[i] === 0) continue;
          let down = false;
          for (let k = 0; k < 8; k++) {
            const j = (y + D8_DY[k]) * 40 + x + D8_DX[k];
            if (z[j] === z[i] && increments[j] < increments[i]) down = true;
          }
          expect(down, `cell (${x}, ${y})`).toBe(true);
        }
      }
    }
  });

  it("counts a level pit with no way out as unresolved and leaves it at 0 (Barnes et al. 2014)", () => {
    const dem = gridOf([
      [9, 9, 9, 9, 9, 9],
      [9, 7, 7, 7, 7, 9],
      [9, 7, 1, 1, 7, 9],
      [9, 7, 1, 1, 7, 9],
      [9, 7, 7, 7, 7, 9],
      [9, 9, 9, 9, 9, 9],
    ]);
    const r = resolveFlats(dem);
    expect(r).toMatchObject({ flatCells: 4, flats: 1, unresolvedFlats: 1, unresolvedCells: 4 });
    expect(Array.from(r.increments).every((v) => v === 0)).toBe(true);
  });

  it("counts a U-shaped level pit as one flat and a one-cell pit as another (derived: 8-connected groups)", () => {
    const dem = gridOf([
      [9, 9, 9, 9, 9, 9, 9, 9],
      [9, 1, 5, 1, 5, 5, 5, 9],
      [9, 1, 5, 1, 5, 2, 5, 9],
      [9, 1, 1, 1, 5, 5, 5, 9],
      [9, 9, 9, 9, 9, 9, 9, 9],
    ]);
    expect(resolveFlats(dem)).toMatchObject({ flatCells: 8, flats: 2, unresolvedFlats: 2, unresolvedCells: 8 });
  });

  it("counts the flats a fill leaves on random DEMs as the 8-connected groups of flat cells (invariant)", () => {
    for (let seed = 61; seed <= 64; seed++) {
      const dem = randomDem(35, 26, seed, 0.03);
      priorityFlood(dem);
      const { increments, flats } = resolveFlats(dem);
      // reference count by flood fill over the cells a resolved flat gives an increment
      const seen = new Uint8Array(increments.length);
      let groups = 0;
      for (let i = 0; i < increments.length; i++) {
        if (increments[i] === 0 || seen[i]) continue;
        groups++;
        const stack = [i];
        seen[i] = 1;
        while (stack.length > 0) {
          const c = stack.pop() as number, x = c % 35, y = (c - x) / 35;
          for (let k = 0; k < 8; k++) {
            const nx = x + D8_DX[k], ny = y + D8_DY[k], j = ny * 35 + nx;
            if (nx >= 0 && ny >= 0 && nx < 35 && ny < 26 && increments[j] > 0 && !seen[j]) {
              seen[j] = 1;
              stack.push(j);
            }
          }
        }
      }
      expect(flats).toBe(groups);
    }
  });

  it("gives the same increments and counts with the flood's flat candidates as when testing every cell (invariant)", () => {
    for (let seed = 71; seed <= 76; seed++) {
      const dem = randomDem(45, 33, seed, 0.04);
      const candidates = new Int32Array((45 * 33 + 31) >>> 5);
      priorityFlood(dem, { flatCandidates: candidates });
      const all = resolveFlats(dem);
      const some = resolveFlats(dem, { candidates });
      expect(all.flatCells).toBeGreaterThan(0);
      expect(Array.from(some.increments)).toEqual(Array.from(all.increments));
      expect({ ...some, increments: null }).toEqual({ ...all, increments: null });
    }
  });

  it("drains a level plateau with no higher terrain to its edge: increments 2·(steps to the edge) (derived; Barnes et al. 2014)", () => {
    const dem = gridOf(Array.from({ length: 7 }, () => Array.from({ length: 7 }, () => 3)));
    const r = resolveFlats(dem);
    expect(r).toMatchObject({ flatCells: 25, flats: 1, unresolvedFlats: 0, maxIncrement: 6 });
    for (let y = 1; y < 6; y++) {
      for (let x = 1; x < 6; x++) {
        const towards = Math.min(x, y, 6 - x, 6 - y);
        expect(r.increments[y * 7 + x], `cell (${x}, ${y})`).toBe(2 * towards);
      }
    }
  });

  it("finds the way out through a draining cell of the flat's height that comes after the flat in row order (derived; Barnes et al. 2014)", () => {
    // (4, 2) is at the flat's 5 m but drains to the 1 m corner: the only way out, tested after the
    // flat cells next to it. Every flat cell touches the 9 m rim, so the away term is 0.
    const rows = [
      [9, 9, 9, 9, 9, 9],
      [9, 5, 5, 5, 9, 9],
      [9, 5, 5, 5, 5, 9],
      [9, 9, 9, 9, 9, 1],
    ];
    const candidates = new Int32Array(1);
    const filled = gridOf(rows);
    priorityFlood(filled, { flatCandidates: candidates });
    for (const r of [resolveFlats(gridOf(rows)), resolveFlats(filled, { candidates })]) {
      expect(r).toMatchObject({ flatCells: 6, flats: 1, unresolvedFlats: 0, maxIncrement: 6 });
      for (let x = 1; x <= 3; x++) {
        for (const y of [1, 2]) expect(r.increments[y * 6 + x], `cell (${x}, ${y})`).toBe(2 * (4 - x));
      }
    }
  });

  it("rejects a candidate set of the wrong size (derived: one bit a cell)", () => {
    expect(() => resolveFlats(flatWithOneOutlet(), { candidates: new Int32Array(1) })).toThrow(RangeError);
  });

  it("finds no flat on a 1×1 DEM, a 2×2 DEM or a DEM fully of nodata (derived: edge cells are never flat)", () => {
    expect(resolveFlats(gridOf([[4]])).flatCells).toBe(0);
    expect(resolveFlats(gridOf([[4, 4], [4, 4]])).flatCells).toBe(0);
    expect(resolveFlats(gridOf([[NaN, NaN, NaN], [NaN, NaN, NaN], [NaN, NaN, NaN]])).flats).toBe(0);
  });
});

/** Barnes et al. (2014) read literally, with arrays of numbers and one breadth-first search per gradient:
 *  flat cells are interior with every neighbour valid and none lower; the search away from higher terrain
 *  starts at flat cells with a higher neighbour, the one towards lower terrain at flat cells with a
 *  neighbour of equal elevation that is not flat; increment = 2·towards + (M − away) with M the largest
 *  away over all flats (0 for an unreached away), and 0 off the flats and on flats with no way out. */
function referenceIncrements(z: Float32Array, w: number, h: number): Int32Array {
  const n = w * h;
  const neighbours = (i: number) => {
    const x = i % w, y = (i - x) / w;
    return Array.from({ length: 8 }, (_, k) => (y + D8_DY[k]) * w + x + D8_DX[k]);
  };
  const flat = new Array<boolean>(n).fill(false);
  for (let y = 1; y < h - 1; y++) {
    for (let x = 1; x < w - 1; x++) {
      const i = y * w + x;
      flat[i] = !Number.isNaN(z[i]) && neighbours(i).every((j) => z[j] >= z[i]);
    }
  }
  const search = (starts: number[]) => {
    const steps = new Array<number>(n).fill(0);
    for (const s of starts) steps[s] = 1;
    for (let queue = starts; queue.length > 0; ) {
      const next: number[] = [];
      for (const c of queue) for (const j of neighbours(c)) if (flat[j] && steps[j] === 0) { steps[j] = steps[c] + 1; next.push(j); }
      queue = next;
    }
    return steps;
  };
  const cells = [...Array(n).keys()].filter((i) => flat[i]);
  const away = search(cells.filter((i) => neighbours(i).some((j) => z[j] > z[i])));
  const towards = search(cells.filter((i) => neighbours(i).some((j) => z[j] === z[i] && !flat[j])));
  const most = Math.max(0, ...away);
  const inc = new Int32Array(n);
  for (const i of cells) if (towards[i] > 0) inc[i] = 2 * towards[i] + (away[i] > 0 ? most - away[i] : 0);
  return inc;
}
