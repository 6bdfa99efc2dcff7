import { describe, expect, it } from "vitest";
import { variogram, logSpacedLags } from "@/lib/fractal/variogram";
import { fbmSurface } from "@/lib/fractal/synth/fbm-surface";
import { makeGrid } from "@/lib/raster/grid";
import { geographicCellGeometry, projectedCellGeometry, type CellGeometry } from "@/lib/raster/cell-geometry";
import { expectClose } from "@/tests/helpers/expect-close";

const CELL = 30;
const geom512 = projectedCellGeometry(512, CELL, CELL);

function plane(width: number, height: number, gx: number, gy: number): Float32Array {
  const z = new Float32Array(width * height);
  for (let y = 0; y < height; y++) for (let x = 0; x < width; x++) z[y * width + x] = gx * x + gy * y;
  return z;
}

describe("variogram()", () => {
  it("gives γ ∝ h² hence D = 2 in every direction on a tilted plane, with diagonal lags √2 longer (derived)", () => {
    const g = makeGrid(plane(64, 64, 0.5, 0.25), 64, 64);
    const v = variogram(g, projectedCellGeometry(64, CELL, CELL), { lags: [1, 2, 4, 8] });
    for (const d of v.directions) expectClose(d.dimension.value, 2, 1e-6);
    expectClose(v.isotropic.dimension.value, 2, 1e-6);
    const ew = v.directions.find((d) => d.direction === "E-W")!;
    expectClose(ew.semivariance[0], 0.5 * 0.5 ** 2, 1e-9); // ½(gx·h)², z in cell-steps of 0.5
    const diag = v.directions.find((d) => d.direction === "NW-SE")!;
    expectClose(diag.distance[2], 4 * CELL * Math.SQRT2, 1e-9);
  });

  it("uses the per-row cell width of a geographic grid as the east–west lag distance (derived)", () => {
    const height = 32, width = 64;
    const dx = Float64Array.from({ length: height }, (_, r) => 20 + r); // widths change by row as on a geographic grid
    const geometry: CellGeometry = { dx, dy: new Float64Array(height).fill(30), area: dx.map((w) => w * 30), geographic: true };
    const z = new Float32Array(width * height);
    for (let y = 0; y < height; y++) for (let x = 0; x < width; x++) z[y * width + x] = x * dx[y]; // z = easting in m
    const v = variogram(makeGrid(z, width, height), geometry, { lags: [1, 2, 4, 8] });
    const ew = v.directions.find((d) => d.direction === "E-W")!;
    const meanDx = dx.reduce((a, b) => a + b) / height;
    expectClose(ew.distance[1], 2 * meanDx, 1e-9);
    expectClose(ew.dimension.value, 2, 1e-9);
  });

  it("gives the same D on a 1″ geographic grid at the equator as on a projected grid of its cell size (derived; Snyder 1987 cell geometry)", () => {
    const g = fbmSurface({ hurst: 0.5, seed: 8, size: 256 });
    const geographic = geographicCellGeometry(256, 0.05, 1 / 3600, 1 / 3600);
    const projected = projectedCellGeometry(256, geographic.dx[128], geographic.dy[128]);
    expectClose(variogram(g, geographic).isotropic.dimension.value, variogram(g, projected).isotropic.dimension.value, 1e-6);
  });

  it("recovers D = 3 − H within ±0.05 on average over seeds 1–4 of 512² fBm, H ∈ {0.2, 0.5, 0.8} (common practice; METHODS.md; Mark & Aronson 1984; bias in docs/fractal-bias.md)", () => {
    for (const hurst of [0.2, 0.5, 0.8]) {
      const ds = [1, 2, 3, 4].map((seed) => variogram(fbmSurface({ hurst, seed, size: 512 }), geom512).isotropic.dimension.value);
      expectClose(ds.reduce((a, b) => a + b) / ds.length, 3 - hurst, 0.05);
    }
  });

  it("reports the anisotropy of a surface stretched 4× along x: E–W smoothest, roughness ratio ≈ 4^H (derived)", () => {
    const hurst = 0.5;
    const v = variogram(fbmSurface({ hurst, seed: 5, size: 512, stretchX: 4 }), geom512);
    expect(v.anisotropy.smoothest).toBe("E-W");
    expect(v.anisotropy.roughest).toBe("N-S");
    // z(x, y) = z_iso(x/4, y): γ_EW(h) = γ_iso(h/4) = 4^(−2H)·γ_NS(h), so √ of the ratio is 4^H = 2
    expectClose(v.anisotropy.roughnessRatio, 4 ** hurst, 0.3);
    const iso = variogram(fbmSurface({ hurst, seed: 5, size: 512 }), geom512);
    expect(iso.anisotropy.roughnessRatio).toBeLessThan(1.2);
  });

  it("gives the same D within 0.02 when the same surface has a 32-cell nodata border (common practice)", () => {
    const g = fbmSurface({ hurst: 0.5, seed: 7, size: 512 });
    const bordered = Float32Array.from(g.data);
    for (let y = 0; y < 512; y++) for (let x = 0; x < 512; x++) {
      if (x < 32 || y < 32 || x >= 480 || y >= 480) bordered[y * 512 + x] = NaN;
    }
    const full = variogram(g, geom512).isotropic.dimension.value;
    const masked = variogram(makeGrid(bordered, 512, 512), geom512);
    expect(Number.isFinite(masked.isotropic.dimension.value)).toBe(true);
    expectClose(masked.isotropic.dimension.value, full, 0.02);
    // invariant: masking the border equals cropping it away (same valid pairs, same distances)
    const crop = new Float32Array(448 * 448);
    for (let y = 0; y < 448; y++) crop.set(g.data.subarray((y + 32) * 512 + 32, (y + 32) * 512 + 480), y * 448);
    const cropped = variogram(makeGrid(crop, 448, 448), projectedCellGeometry(448, CELL, CELL), { lags: masked.isotropic.lags });
    expectClose(masked.isotropic.semivariance[3], cropped.isotropic.semivariance[3], 1e-6 * cropped.isotropic.semivariance[3]);
  });

  it("rejects lags that do not fit in the grid", () => {
    expect(() => variogram(makeGrid(new Float32Array(16), 4, 4), projectedCellGeometry(4, 1, 1), { lags: [1, 4] })).toThrow(RangeError);
  });
});

describe("logSpacedLags()", () => {
  it("starts at 1, ends at the largest lag and never repeats (derived)", () => {
    const l = logSpacedLags(128, 16);
    expect(l[0]).toBe(1);
    expect(l[l.length - 1]).toBe(128);
    expect(new Set(l).size).toBe(l.length);
  });
});
