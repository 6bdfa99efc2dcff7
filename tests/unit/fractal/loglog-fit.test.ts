import { describe, expect, it } from "vitest";
import { deriveFromSlope, fitLogLog, MAX_ABS_RESIDUAL } from "@/lib/fractal/loglog-fit";
import { expectClose } from "@/tests/helpers/expect-close";

const scales = [1, 2, 4, 8, 16, 32, 64, 128];

describe("fitLogLog()", () => {
  it("recovers the exponent of an exact power law y = 3·x^1.5 with R² = 1 over every point (derived)", () => {
    const fit = fitLogLog(scales, scales.map((s) => 3 * s ** 1.5), { unit: "m" });
    expectClose(fit.slope, 1.5, 1e-12);
    expectClose(fit.intercept, Math.log(3), 1e-12);
    expectClose(fit.rSquared, 1, 1e-12);
    expect(fit.points.every((p) => p.used)).toBe(true);
    expect(fit.breaks).toEqual([]);
    expect(fit.range).toEqual({ min: 1, max: 128, unit: "m" });
  });

  it("picks the wider straight segment of a broken power law and reports the break between them (derived)", () => {
    // slope 1 up to 16, slope 0.2 beyond: five points below, three above the bend
    const measures = scales.map((s) => (s <= 16 ? s : 16 * (s / 16) ** 0.2));
    const fit = fitLogLog(scales, measures, { unit: "m" });
    expect(fit.criterionMet).toBe(true);
    expectClose(fit.slope, 1, 1e-12);
    expect(fit.range.max).toBe(16);
    expect(fit.breaks).toHaveLength(1);
    expect(fit.breaks[0].side).toBe("above");
    expectClose(fit.breaks[0].scale, Math.sqrt(16 * 32), 1e-9);
  });

  it("fits exactly the user range when one is given, overriding the automatic rule (derived)", () => {
    const measures = scales.map((s) => (s <= 16 ? s : 16 * (s / 16) ** 0.2));
    const fit = fitLogLog(scales, measures, { unit: "m", range: { min: 16, max: 128 } });
    expect(fit.rangeSource).toBe("user");
    expectClose(fit.slope, 0.2, 1e-12);
    expect(fit.points.filter((p) => p.used).map((p) => p.scale)).toEqual([16, 32, 64, 128]);
  });

  it("leaves non-positive measures unused and keeps them in the evidence (derived)", () => {
    const fit = fitLogLog([1, 2, 4, 8, 16], [0, 2, 4, 8, 16], { unit: "cell" });
    expect(fit.points[0]).toEqual({ scale: 1, measure: 0, used: false });
    expectClose(fit.slope, 1, 1e-12);
  });

  it("says so when no window is straight within the residual bound (derived)", () => {
    const zigzag = scales.map((s, i) => s * Math.exp(i % 2 === 0 ? 3 * MAX_ABS_RESIDUAL : -3 * MAX_ABS_RESIDUAL));
    const fit = fitLogLog(scales, zigzag, { unit: "m" });
    expect(fit.criterionMet).toBe(false);
    expect(fit.n).toBe(scales.length);
  });

  it("changes only the intercept when every measure is multiplied by a constant (invariant, derived)", () => {
    const m = scales.map((s) => s ** 0.7 * (1 + 0.01 * Math.sin(s)));
    const a = fitLogLog(scales, m, { unit: "m" });
    const b = fitLogLog(scales, m.map((v) => 50 * v), { unit: "m" });
    expectClose(b.slope, a.slope, 1e-12);
    expectClose(b.intercept - a.intercept, Math.log(50), 1e-12);
  });

  it("rejects a user range that holds fewer than two points", () => {
    expect(() => fitLogLog(scales, scales, { unit: "m", range: { min: 3, max: 3.5 } })).toThrow(RangeError);
  });
});

describe("deriveFromSlope()", () => {
  it("maps slope, SE and CI through D = offset + factor·slope and keeps the CI ordered (derived)", () => {
    const fit = fitLogLog(scales, scales.map((s, i) => s ** 0.6 * (1 + 0.01 * (i % 3))), { unit: "m" });
    const d = deriveFromSlope(fit, 3, -0.5);
    expectClose(d.value, 3 - 0.5 * fit.slope, 1e-12);
    expectClose(d.se, 0.5 * fit.slopeSe, 1e-12);
    expectClose(d.ci[0], 3 - 0.5 * fit.slopeCi[1], 1e-12);
    expect(d.ci[0]).toBeLessThan(d.ci[1]);
  });
});
