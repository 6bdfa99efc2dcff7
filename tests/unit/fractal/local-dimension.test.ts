import { describe, expect, it } from "vitest";
import { localDimension } from "@/lib/fractal/local-dimension";
import { fbmSurface } from "@/lib/fractal/synth/fbm-surface";
import { plane } from "@/lib/fractal/synth/plane";
import { makeGrid } from "@/lib/raster/grid";
import { projectedCellGeometry } from "@/lib/raster/cell-geometry";
import { expectClose } from "@/tests/helpers/expect-close";

const geom = projectedCellGeometry(512, 30, 30);
const mean = (v: number[]) => v.reduce((a, b) => a + b) / v.length;

describe("localDimension()", () => {
  it("shows D ≈ 2.8 on the H = 0.2 half and D ≈ 2.2 on the H = 0.8 half of a two-halves surface (derived; small-window bias measured)", () => {
    const a = fbmSurface({ hurst: 0.2, seed: 1, size: 512 }), b = fbmSurface({ hurst: 0.8, seed: 2, size: 512 });
    const z = new Float32Array(512 * 512);
    for (let y = 0; y < 512; y++) for (let x = 0; x < 512; x++) z[y * 512 + x] = (x < 256 ? a : b).data[y * 512 + x];
    const r = localDimension(makeGrid(z, 512, 512), geom, { window: 64, step: 64 });
    expect([r.dimension.width, r.dimension.height]).toEqual([8, 8]);
    const left: number[] = [], right: number[] = [];
    for (let j = 0; j < 8; j++) for (let i = 0; i < 8; i++) {
      if (i <= 2) left.push(r.dimension.data[j * 8 + i]);
      if (i >= 5) right.push(r.dimension.data[j * 8 + i]);
    }
    // 64-cell windows read low H surfaces rougher-than-smooth by ≈ 0.13 (measured here)
    expectClose(mean(left), 2.8, 0.2);
    expectClose(mean(right), 2.2, 0.07);
    expect(Math.min(...left)).toBeGreaterThan(Math.max(...right));
  });

  it("leaves nodata where a window is too sparse or flat (derived)", () => {
    const g = plane(128, 128, { z0: 10 }); // flat: no dimension anywhere
    const r = localDimension(g, projectedCellGeometry(128, 30, 30), { window: 32, step: 32 });
    expect(r.summary.estimated).toBe(0);
    expect(Array.from(r.dimension.data).every((v) => Number.isNaN(v))).toBe(true);
  });

  it("gives D = 2 in every window of a tilted plane (derived)", () => {
    const r = localDimension(plane(96, 96, { gx: 2, gy: 1 }), projectedCellGeometry(96, 30, 30), { window: 32, step: 16 });
    for (const d of r.dimension.data) expectClose(d, 2, 1e-6);
    expect([r.dimension.width, r.dimension.height]).toEqual([6, 6]);
  });

  it("rejects a window larger than the grid", () => {
    expect(() => localDimension(plane(32, 32), projectedCellGeometry(32, 1, 1), { window: 64, step: 8 })).toThrow(RangeError);
  });
});
