import { describe, expect, it } from "vitest";
import { cubeCounting } from "@/lib/fractal/cube-counting";
import { fbmSurface } from "@/lib/fractal/synth/fbm-surface";
import { plane } from "@/lib/fractal/synth/plane";
import { makeGrid } from "@/lib/raster/grid";
import { projectedCellGeometry } from "@/lib/raster/cell-geometry";
import { mulberry32 } from "@/lib/fractal/synth/mulberry32";
import { expectClose } from "@/tests/helpers/expect-close";

const geom512 = projectedCellGeometry(512, 30, 30);

describe("cubeCounting()", () => {
  it("gives D = 2 exactly on a horizontal plane in both vertical normalisations (derived; METHODS.md)", () => {
    const g = plane(256, 256, { z0: 1234.5 });
    for (const normalisation of ["true-units", "grid-extent"] as const) {
      const r = cubeCounting(g, projectedCellGeometry(256, 30, 30), { normalisation });
      expect(r.normalisation).toBe(normalisation);
      expect(r.counts).toEqual(r.sides.map((s) => (256 / s) ** 2));
      expectClose(r.dimension.value, 2, 1e-12);
    }
  });

  it("counts exactly what a direct scan of every s×s block counts (invariant, derived)", () => {
    const u = mulberry32(3);
    const z = Float32Array.from({ length: 64 * 48 }, () => 500 * u());
    z[100] = NaN; // nodata drops out of its block
    const g = makeGrid(z, 64, 48);
    const r = cubeCounting(g, projectedCellGeometry(48, 10, 10));
    let zmin = Infinity;
    for (const v of z) if (v < zmin) zmin = v;
    r.sides.forEach((s, k) => {
      let n = 0;
      for (let by = 0; by < Math.floor(48 / s); by++) for (let bx = 0; bx < Math.floor(64 / s); bx++) {
        let lo = Infinity, hi = -Infinity;
        for (let y = by * s; y < by * s + s; y++) for (let x = bx * s; x < bx * s + s; x++) {
          const v = z[y * 64 + x]; if (v < lo) lo = v; if (v > hi) hi = v;
        }
        n += Math.floor((hi - zmin) / (s * 10)) - Math.floor((lo - zmin) / (s * 10)) + 1;
      }
      expect(r.counts[k]).toBe(n);
    });
  });

  it("changes no count when a constant is added to every elevation (invariant, derived)", () => {
    const g = fbmSurface({ hurst: 0.5, seed: 2, size: 128 });
    const shifted = makeGrid(g.data.map((v) => v + 777), 128, 128);
    const geom = projectedCellGeometry(128, 30, 30);
    expect(cubeCounting(shifted, geom).counts).toEqual(cubeCounting(g, geom).counts);
  });

  // Measured bias, docs/fractal-bias.md: 512² fBm, σ = 100 m, 30 m cells, seeds 1–4 (measured here, derived).
  const BIAS = [
    { hurst: 0.2, trueUnits: -0.738, gridExtent: -0.292 },
    { hurst: 0.5, trueUnits: -0.501, gridExtent: -0.183 },
    { hurst: 0.8, trueUnits: -0.163, gridExtent: -0.039 },
  ];
  it("keeps the measured bias on 512² fBm surfaces (docs/fractal-bias.md; compression of D as in Panigrahy et al. 2017)", () => {
    for (const { hurst, trueUnits, gridExtent } of BIAS) {
      let t = 0, e = 0;
      for (const seed of [1, 2, 3, 4]) {
        const g = fbmSurface({ hurst, seed, size: 512 });
        t += cubeCounting(g, geom512).dimension.value / 4;
        e += cubeCounting(g, geom512, { normalisation: "grid-extent" }).dimension.value / 4;
      }
      expectClose(t - (3 - hurst), trueUnits, 0.1);
      expectClose(e - (3 - hurst), gridExtent, 0.05);
    }
  });
});
