import { describe, expect, it } from "vitest";
import { longestFlowPath } from "@/lib/network/flow-length";
import { flowAccumulation } from "@/lib/hydro/flow-accumulation";
import { d8StepLengths } from "@/lib/hydro/d8";
import { makeGrid } from "@/lib/raster/grid";
import { D8_DX, D8_DY, NO_FLOW } from "@/lib/hydro/neighbours";
import { expectClose } from "@/tests/helpers/expect-close";
import { Y_GRID } from "./raster-grids";

function yGridFlowLength() {
  const dem = makeGrid(Y_GRID.elevation, Y_GRID.width, Y_GRID.height);
  const acc = flowAccumulation(Y_GRID.directions, dem, Y_GRID.cellGeometry);
  return longestFlowPath(Y_GRID.directions, acc.order, Y_GRID.cellGeometry);
}

describe("longestFlowPath()", () => {
  it("measures 10 m + 14.14 m + 10 m from a divide cell to the outlet of the hand-made grid (derived by hand)", () => {
    const l = yGridFlowLength();
    expectClose(l[17], 20 + 10 * Math.SQRT2, 1e-5); // Float32
    expectClose(l[12], 10 + 10 * Math.SQRT2, 1e-5);
    expect(l[1]).toBe(0); // nothing drains into a divide cell
  });
  it("grows by at least one step down every flow path (invariant)", () => {
    const l = yGridFlowLength();
    const { data: dir, width: w } = Y_GRID.directions;
    const steps = new Float64Array(8);
    for (let c = 0; c < dir.length; c++) {
      if (dir[c] === NO_FLOW) continue;
      const y = Math.floor(c / w), d = (y + D8_DY[dir[c]]) * w + (c % w) + D8_DX[dir[c]];
      expect(l[d]).toBeGreaterThanOrEqual(l[c] + d8StepLengths(Y_GRID.cellGeometry, y, steps)[dir[c]] - 1e-4);
    }
  });
});
