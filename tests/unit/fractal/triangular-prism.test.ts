import { describe, expect, it } from "vitest";
import { triangularPrism } from "@/lib/fractal/triangular-prism";
import { fbmSurface } from "@/lib/fractal/synth/fbm-surface";
import { plane } from "@/lib/fractal/synth/plane";
import { makeGrid } from "@/lib/raster/grid";
import { projectedCellGeometry } from "@/lib/raster/cell-geometry";
import { expectClose } from "@/tests/helpers/expect-close";

describe("triangularPrism()", () => {
  it("gives D = 2 exactly on a tilted plane, whose area ratio is √(1 + gx² + gy²) at every step (derived; Clarke 1986)", () => {
    const g = plane(129, 129, { z0: 50, gx: 6, gy: -3 }); // 6 m and −3 m per 30 m cell
    const r = triangularPrism(g, projectedCellGeometry(129, 30, 30));
    const ratio = Math.sqrt(1 + (6 / 30) ** 2 + (3 / 30) ** 2);
    for (const a of r.areaRatio) expectClose(a, ratio, 1e-6);
    expectClose(r.dimension.value, 2, 1e-6);
    expect(r.steps[0]).toBe(1);
  });

  it("skips squares with a nodata corner and keeps the plane's ratio (invariant, derived)", () => {
    const g = plane(65, 65, { gx: 3 });
    g.data[65 * 10 + 10] = NaN;
    const r = triangularPrism(g, projectedCellGeometry(65, 30, 30));
    for (const a of r.areaRatio) expectClose(a, Math.sqrt(1 + 0.01), 1e-6);
  });

  it("gives the same D within 0.02 when the same surface has a 32-cell nodata border (common practice)", () => {
    const geom = projectedCellGeometry(512, 30, 30);
    const g = fbmSurface({ hurst: 0.5, seed: 7, size: 512, sigma: 1000 });
    const bordered = g.data.map((v, i) => (i % 512 < 32 || i % 512 >= 480 || i < 32 * 512 || i >= 480 * 512 ? NaN : v));
    expectClose(triangularPrism(makeGrid(bordered, 512, 512), geom).dimension.value, triangularPrism(g, geom).dimension.value, 0.02);
  });

  it("keeps the measured bias on 512² fBm surfaces in true units (docs/fractal-bias.md, measured)", () => {
    const geom = projectedCellGeometry(512, 30, 30);
    for (const [hurst, bias] of [[0.2, -0.688], [0.5, -0.479], [0.8, -0.197]]) {
      let d = 0;
      for (const seed of [1, 2, 3, 4]) d += triangularPrism(fbmSurface({ hurst, seed, size: 512 }), geom).dimension.value / 4;
      expectClose(d - (3 - hurst), bias, 0.03);
    }
  });

  it("rejects a grid too small for four squares a side", () => {
    expect(() => triangularPrism(makeGrid(new Float32Array(64), 8, 8), projectedCellGeometry(8, 1, 1))).toThrow(RangeError);
  });
});
