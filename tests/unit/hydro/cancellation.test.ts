import { describe, expect, it } from "vitest";
import { projectedCellGeometry } from "@/lib/raster/cell-geometry";
import { priorityFlood } from "@/lib/hydro/priority-flood";
import { resolveFlats } from "@/lib/hydro/flats";
import { d8Directions } from "@/lib/hydro/d8";
import { flowAccumulation } from "@/lib/hydro/flow-accumulation";
import { ABORT_CHECK_CELLS, ABORT_CHECK_ROWS } from "@/lib/hydro/cancellation";
import { makeGrid } from "@/lib/raster/grid";
import { randomDem } from "@/tests/unit/hydro/dem-fixtures";
import { countingSignal } from "@/tests/unit/hydro/counting-signal";

describe("the drainage stages with an aborted signal", () => {
  it("throw the signal's reason instead of running (common practice: AbortSignal.throwIfAborted)", () => {
    const dem = randomDem(20, 20, 3, 0);
    const geometry = projectedCellGeometry(20, 1, 1);
    const directions = d8Directions(dem, geometry);
    const signal = AbortSignal.abort(new Error("cancelled by the user"));
    expect(() => priorityFlood(dem, { signal })).toThrow("cancelled by the user");
    expect(() => resolveFlats(dem, { signal })).toThrow("cancelled by the user");
    expect(() => d8Directions(dem, geometry, { signal })).toThrow("cancelled by the user");
    expect(() => flowAccumulation(directions, dem, geometry, { signal })).toThrow("cancelled by the user");
  });
});

/**
 * Runs `stage` once with a counting signal that never aborts (total checks, which must include the
 * in-loop checks the cadence constants imply: derived from lib/hydro/cancellation.ts), then with one
 * that aborts at the second check inside the loop, and expects the reason thrown, nothing returned
 * and fewer checks seen than a full run makes, i.e. it stopped before finishing.
 */
function expectCancelledInsideLoop(stage: (signal: AbortSignal) => unknown, expectedLoopChecks: number, entryChecks: number) {
  const full = countingSignal();
  stage(full.signal);
  expect(full.checks).toBeGreaterThanOrEqual(entryChecks + expectedLoopChecks);
  const cut = countingSignal(entryChecks + 2);
  let returned = false;
  expect(() => { stage(cut.signal); returned = true; }).toThrow(cut.reason);
  expect(returned).toBe(false);
  expect(cut.checks).toBe(entryChecks + 2);
  expect(cut.checks).toBeLessThan(full.checks);
}

describe("the drainage stages cancelled in the middle of their loops", () => {
  // narrow and tall: many rows for the row-cadence checks at little cost
  const W = 6, H = 4 * ABORT_CHECK_ROWS + 10;
  const rowChecks = Math.floor((H - 1) / ABORT_CHECK_ROWS); // rows 256, 512, … below the last row

  it("priorityFlood() stops at its per-cell check with the signal's reason (derived: ABORT_CHECK_CELLS)", () => {
    // just over two check periods of cells, so the loop makes at least two checks
    const side = Math.ceil(Math.sqrt(2.1 * ABORT_CHECK_CELLS));
    const dem = randomDem(side, side, 5, 0);
    expectCancelledInsideLoop((signal) => priorityFlood(dem, { signal }), 2, 1);
  });

  it("resolveFlats() stops at its per-row check with the signal's reason (derived: ABORT_CHECK_ROWS)", () => {
    // a flat strip (one elevation) inside a higher rim: every interior row is tested for flats
    const z = new Float32Array(W * H).fill(5);
    for (let y = 0; y < H; y++) { z[y * W] = 9; z[y * W + W - 1] = 9; }
    for (let x = 0; x < W; x++) { z[x] = 9; z[(H - 1) * W + x] = 9; }
    z[(H - 1) * W + 2] = 1; // the one way out, on the south edge
    const dem = makeGrid(z, W, H);
    expectCancelledInsideLoop((signal) => resolveFlats(dem, { signal }), rowChecks, 1);
  });

  it("d8Directions() stops at its per-row check with the signal's reason (derived: ABORT_CHECK_ROWS)", () => {
    const dem = randomDem(W, H, 7, 0);
    const geometry = projectedCellGeometry(H, 1, 1);
    // d8Directions makes no check before its row loop: its first check is at row 0
    expectCancelledInsideLoop((signal) => d8Directions(dem, geometry, { signal }), rowChecks + 1, 0);
  });

  it("flowAccumulation() stops at its per-row check with the signal's reason (derived: ABORT_CHECK_ROWS)", () => {
    const dem = randomDem(W, H, 9, 0, false);
    const geometry = projectedCellGeometry(H, 1, 1);
    priorityFlood(dem); // fills in place; cells left on flats are outlets (NO_FLOW), which is all this needs
    const directions = d8Directions(dem, geometry);
    expectCancelledInsideLoop((signal) => flowAccumulation(directions, dem, geometry, { signal }), rowChecks + 1, 0);
  });
});

describe("priorityFlood() progress", () => {
  it("reports a rising share of the valid cells at each per-cell check, none past 1 (derived: ABORT_CHECK_CELLS)", () => {
    const side = Math.ceil(Math.sqrt(3.1 * ABORT_CHECK_CELLS));
    const dem = randomDem(side, side, 9, 0.01, false);
    const seen: number[] = [];
    priorityFlood(dem, { onProgress: (f) => seen.push(f) });
    expect(seen.length).toBeGreaterThanOrEqual(3);
    const valid = dem.data.filter((v) => !Number.isNaN(v)).length;
    seen.forEach((f, k) => {
      expect(f).toBeGreaterThan(0);
      expect(f).toBeLessThanOrEqual(1);
      if (k > 0) expect(f).toBeGreaterThanOrEqual(seen[k - 1]);
      // derived: the check comes every ABORT_CHECK_CELLS turns of the loop, one cell expanded (or a slope cell
      // sent back to the queue) a turn
      expect(f).toBeCloseTo(Math.min(1, ((k + 1) * ABORT_CHECK_CELLS) / valid), 12);
    });
  });
});

describe("flowAccumulation() progress", () => {
  it("reports a rising share of the valid cells ordered, inside (0, 1], as the walk goes (derived: ABORT_CHECK_CELLS)", () => {
    const side = Math.ceil(Math.sqrt(3.1 * ABORT_CHECK_CELLS));
    const dem = randomDem(side, side, 10, 0, false);
    priorityFlood(dem, { epsilon: true });
    const geometry = projectedCellGeometry(side, 1, 1);
    const seen: number[] = [];
    flowAccumulation(d8Directions(dem, geometry), dem, geometry, { onProgress: (f) => seen.push(f) });
    expect(seen.length).toBe(Math.floor((side * side - 1) / ABORT_CHECK_CELLS)); // one at each check after the first
    seen.forEach((f, k) => {
      expect(f).toBeGreaterThan(0);
      expect(f).toBeLessThanOrEqual(1);
      if (k > 0) expect(f).toBeGreaterThanOrEqual(seen[k - 1]);
    });
  });
});
