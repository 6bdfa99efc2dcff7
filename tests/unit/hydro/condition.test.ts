import { describe, expect, it } from "vitest";
import { projectedCellGeometry, type CellGeometry } from "@/lib/raster/cell-geometry";
import { conditionAndRoute, type ConditionStage } from "@/lib/hydro/condition";
import { HelperThread } from "@/lib/hydro/helper-thread";
import { priorityFlood } from "@/lib/hydro/priority-flood";
import { resolveFlats } from "@/lib/hydro/flats";
import { d8Directions } from "@/lib/hydro/d8";
import { flatWithOneOutlet, randomDem } from "@/tests/unit/hydro/dem-fixtures";

/** Per-row geometry whose widths differ by row, as on a geographic grid. */
function rowVaryingGeometry(h: number): CellGeometry {
  const dx = Float64Array.from({ length: h }, (_, y) => 30 - y * 0.1);
  const dy = new Float64Array(h).fill(30);
  return { dx, dy, area: dx.map((v, y) => v * dy[y]), geographic: true };
}

/** The stages one after another on one thread: what the two-thread route must reproduce. */
function sequential(dem: ReturnType<typeof randomDem>, geometry: CellGeometry) {
  const filled = { ...dem, data: dem.data.slice() };
  const fill = priorityFlood(filled);
  const { increments, ...flats } = resolveFlats(filled);
  const donors = new Uint8Array(dem.data.length);
  const directions = d8Directions(filled, geometry, { flatIncrements: increments, donors });
  return { filled, fill, flats, directions, donors };
}

describe("conditionAndRoute()", () => {
  it("gives the filled DEM, directions, donor counts and flat counts of the stages run one after another, leaving its input as it was (invariant)", async () => {
    for (const [seed, geometry] of [[81, projectedCellGeometry(41, 30, 30)], [82, rowVaryingGeometry(41)], [83, projectedCellGeometry(41, 10, 30)]] as const) {
      const dem = randomDem(53, 41, seed, 0.05);
      const before = dem.data.slice();
      const expected = sequential(dem, geometry);
      expect(expected.flats.flatCells).toBeGreaterThan(0);
      const stages: ConditionStage[] = [];
      const routed = await conditionAndRoute(dem, geometry, { onStage: (s) => stages.push(s) });
      expect(stages).toEqual(["fill", "flats", "directions"]);
      expect(routed.dem.data).toEqual(expected.filled.data);
      expect(routed.directions.data).toEqual(expected.directions.data);
      expect(routed.donors).toEqual(expected.donors);
      expect(routed.fill).toEqual(expected.fill);
      expect(routed.flats).toEqual(expected.flats);
      expect(routed.spare?.map((a) => a.length)).toEqual([dem.data.length, dem.data.length]);
      expect(dem.data).toEqual(before);
    }
  });

  it("routes the 9×7 flat with one outlet so every interior cell drains (Barnes et al. 2014)", async () => {
    const routed = await conditionAndRoute(flatWithOneOutlet(), projectedCellGeometry(7, 1, 1));
    expect(routed.flats).toMatchObject({ flatCells: 35, flats: 1, unresolvedFlats: 0 });
    for (let y = 1; y < 6; y++) for (let x = 1; x < 8; x++) expect(routed.directions.data[y * 9 + x]).toBeLessThan(8);
  });

  it("with epsilon fills on one thread and reports no flats (Barnes et al. 2014, Alg. 3)", async () => {
    const dem = randomDem(30, 20, 84, 0.05);
    const geometry = projectedCellGeometry(20, 30, 30);
    const filled = { ...dem, data: dem.data.slice() };
    priorityFlood(filled, { epsilon: true });
    const stages: ConditionStage[] = [];
    const routed = await conditionAndRoute(dem, geometry, { epsilon: true, onStage: (s) => stages.push(s) });
    expect(stages).toEqual(["fill", "directions"]);
    expect(routed.flats).toBeNull();
    expect(routed.dem.data).toEqual(filled.data);
    expect(routed.directions.data).toEqual(d8Directions(filled, geometry).data);
  });

  it("throws an aborted signal's reason (common practice: AbortSignal.throwIfAborted)", async () => {
    const signal = AbortSignal.abort(new Error("cancelled by the test"));
    await expect(conditionAndRoute(randomDem(20, 20, 85, 0), projectedCellGeometry(20, 1, 1), { signal })).rejects.toThrow("cancelled by the test");
  });
});

describe("HelperThread", () => {
  it("refuses an array outside a SharedArrayBuffer, whose writes the thread would lose (derived: postMessage copies it)", () => {
    const helper = new HelperThread();
    try {
      expect(() => helper.run("stepsTowardsLower", new Int32Array(9), new Int32Array(9), new Int32Array(1), 0, 3)).toThrow(TypeError);
    } finally {
      helper.close();
    }
  });

  it("runs a kernel on shared arrays and reports a kernel's error (derived)", async () => {
    const helper = new HelperThread();
    try {
      // a 3×3 grid whose centre is the one flat cell, with a way out: step 1 towards lower terrain
      const shared = (n: number) => new Int32Array(new SharedArrayBuffer(4 * n));
      const state = shared(9), towards = shared(9), queue = shared(1);
      state[4] = -1;
      queue[0] = 4;
      expect(await helper.run("stepsTowardsLower", state, towards, queue, 1, 3)).toBe(1);
      expect(towards[4]).toBe(1);
      // a null grid makes the kernel throw inside the thread
      await expect(helper.run("stepsTowardsLower", null as unknown as Int32Array, towards, queue, 1, 3)).rejects.toThrow(/helper thread/);
    } finally {
      helper.close();
    }
  });
});
