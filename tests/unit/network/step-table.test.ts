import { describe, expect, it } from "vitest";
import { d8StepTable } from "@/lib/network/step-table";
import { d8StepLengths } from "@/lib/hydro/d8";
import { geographicCellGeometry, projectedCellGeometry } from "@/lib/raster/cell-geometry";
import { expectClose } from "@/tests/helpers/expect-close";

describe("d8StepTable()", () => {
  it("holds 30 m and 30·√2 m steps on a 30 m projected grid (derived)", () => {
    const t = d8StepTable(projectedCellGeometry(3, 30, 30));
    expect(t).toHaveLength(24);
    expect(t[8 + 0]).toBe(30);
    expectClose(t[8 + 1], 30 * Math.SQRT2, 1e-12);
  });
  it("repeats d8StepLengths row by row on a geographic grid (invariant)", () => {
    const g = geographicCellGeometry(5, 60, 0.01, 0.01);
    const t = d8StepTable(g);
    for (let y = 0; y < 5; y++) expect(Array.from(t.subarray(8 * y, 8 * y + 8))).toEqual(Array.from(d8StepLengths(g, y)));
  });
});
