import { describe, expect, it } from "vitest";
import { projectedCellGeometry } from "@/lib/raster/cell-geometry";
import { priorityFlood } from "@/lib/hydro/priority-flood";
import { resolveFlats } from "@/lib/hydro/flats";
import { d8Directions } from "@/lib/hydro/d8";
import { flowAccumulation } from "@/lib/hydro/flow-accumulation";
import { randomDem } from "@/tests/unit/hydro/dem-fixtures";

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
