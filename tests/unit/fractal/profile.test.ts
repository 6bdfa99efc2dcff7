import { describe, expect, it } from "vitest";
import { profileDimension, sampleTransect } from "@/lib/fractal/profile";
import { fbmProfile } from "@/lib/fractal/synth/fbm-profile";
import { plane } from "@/lib/fractal/synth/plane";
import { projectedCellGeometry } from "@/lib/raster/cell-geometry";
import { expectClose } from "@/tests/helpers/expect-close";

describe("profileDimension()", () => {
  it("recovers D = 2 − H within ±0.05 on average by variogram and by spectrum over six 16384-sample fBm profiles (common practice; METHODS.md)", () => {
    for (const hurst of [0.2, 0.5, 0.8]) {
      let v = 0, s = 0;
      for (const seed of [1, 2, 3, 4, 5, 6]) {
        const p = profileDimension(fbmProfile({ hurst, seed, length: 16384 }), 10);
        v += p.variogram.dimension.value / 6; s += p.spectrum!.dimension.value / 6;
      }
      expectClose(v, 2 - hurst, 0.05);
      expectClose(s, 2 - hurst, 0.05);
    }
  });

  it("gives D = 1 by the variogram on a straight ramp, γ = ½(g·h)² (derived)", () => {
    const z = Float64Array.from({ length: 256 }, (_, i) => 3 * i);
    const p = profileDimension(z, 5, { range: "all" });
    expectClose(p.variogram.dimension.value, 1, 1e-9);
    expectClose(p.variogram.semivariance[0], 0.5 * 9, 1e-9);
    expect(p.spectrum).toBeNull(); // a straight line has no power left after detrending
  });

  it("ignores nodata samples in the variogram pairs (derived)", () => {
    const z = Float64Array.from({ length: 64 }, (_, i) => i);
    z[10] = NaN;
    const p = profileDimension(z, 1, { lags: [1, 2, 4, 8] });
    expect(p.variogram.pairs[0]).toBe(63 - 2);
  });
});

describe("sampleTransect()", () => {
  it("samples a plane exactly along a diagonal, one cell apart, with the spacing in metres (derived)", () => {
    const g = plane(50, 50, { gx: 2, gy: 1 });
    const t = sampleTransect(g, projectedCellGeometry(50, 30, 30), [0, 0], [30, 40]);
    expect(t.values.length).toBe(51);
    expectClose(t.spacing, 30, 1e-9);
    expectClose(t.values[25], 2 * 15 + 1 * 20, 1e-4);
  });
});
