import { describe, expect, it } from "vitest";
import { powerSpectrum, fitPlane } from "@/lib/fractal/power-spectrum";
import { fbmSurface } from "@/lib/fractal/synth/fbm-surface";
import { plane } from "@/lib/fractal/synth/plane";
import { makeGrid } from "@/lib/raster/grid";
import { projectedCellGeometry } from "@/lib/raster/cell-geometry";
import { expectClose } from "@/tests/helpers/expect-close";

const geom512 = projectedCellGeometry(512, 30, 30);

describe("powerSpectrum()", () => {
  it("recovers D = (8 − β)/2 = 3 − H within ±0.05 on average over seeds of 512² fBm, H ∈ {0.2, 0.5, 0.8} (common practice; METHODS.md; Huang & Turcotte 1989)", () => {
    for (const hurst of [0.2, 0.5, 0.8]) {
      const ds = [1, 2, 3, 4].map((seed) => powerSpectrum(fbmSurface({ hurst, seed, size: 512 }), geom512).dimension.value);
      expectClose(ds.reduce((a, b) => a + b) / ds.length, 3 - hurst, 0.05);
    }
  });

  it("puts the power of a sinusoid of wavelength 640 m into the annulus around 1/640 m⁻¹ (derived)", () => {
    const n = 256, z = new Float32Array(n * n);
    for (let y = 0; y < n; y++) for (let x = 0; x < n; x++) z[y * n + x] = Math.sin((2 * Math.PI * x * 10) / 640);
    const r = powerSpectrum(makeGrid(z, n, n), projectedCellGeometry(n, 10, 10));
    const peak = r.power.indexOf(Math.max(...r.power));
    const ratio = r.wavelength[peak] / 640;
    expect(ratio).toBeGreaterThan(0.8);
    expect(ratio).toBeLessThan(1.25);
  });

  it("gives the same D when the elevations are scaled by a constant (invariant, derived)", () => {
    const g = fbmSurface({ hurst: 0.5, seed: 9, size: 256 });
    const geom = projectedCellGeometry(256, 30, 30);
    const a = powerSpectrum(g, geom).dimension.value;
    const b = powerSpectrum(makeGrid(g.data.map((v) => 3 * v), 256, 256), geom).dimension.value;
    expectClose(b, a, 1e-4);
  });

  it("gives the same D within 0.02 when the same surface has a 32-cell nodata border (common practice)", () => {
    const g = fbmSurface({ hurst: 0.5, seed: 7, size: 512 });
    const bordered = g.data.map((v, i) => (i % 512 < 32 || i % 512 >= 480 || i < 32 * 512 || i >= 480 * 512 ? NaN : v));
    expectClose(powerSpectrum(makeGrid(bordered, 512, 512), geom512).dimension.value, powerSpectrum(g, geom512).dimension.value, 0.02);
  });

  it("zero-pads a grid whose sides are not powers of two (derived)", () => {
    const g = fbmSurface({ hurst: 0.5, seed: 4, size: 256 });
    const crop = new Float32Array(200 * 150);
    for (let y = 0; y < 150; y++) crop.set(g.data.subarray(y * 256, y * 256 + 200), y * 200);
    const r = powerSpectrum(makeGrid(crop, 200, 150), projectedCellGeometry(150, 30, 30));
    expect([r.fftWidth, r.fftHeight]).toEqual([256, 256]);
    expect(Number.isFinite(r.dimension.value)).toBe(true);
  });
});

describe("fitPlane()", () => {
  it("recovers z = 5 + 2x − 3y exactly (derived)", () => {
    const [a, b, c] = fitPlane(plane(20, 10, { z0: 5, gx: 2, gy: -3 }));
    expectClose(a, 5, 1e-9); expectClose(b, 2, 1e-9); expectClose(c, -3, 1e-9);
  });
});
