import { describe, expect, it } from "vitest";
import { linearRegression } from "@/lib/stats/linear-regression";
import { expectClose } from "@/tests/helpers/expect-close";

describe("linearRegression()", () => {
  it("recovers an exact line with R² = 1 and zero standard error (derived)", () => {
    const x = [1, 2, 3, 4, 5], y = x.map((v) => 3 - 2 * v);
    const fit = linearRegression(x, y);
    expectClose(fit.slope, -2, 1e-12);
    expectClose(fit.intercept, 3, 1e-12);
    expect(fit.rSquared).toBe(1);
    expectClose(fit.slopeStdError, 0, 1e-12);
  });
  it("matches the textbook standard error on a small data set (derived by hand)", () => {
    // x = 1..4, y = 1,3,2,4 → slope 0.8, intercept 0.5, RSS 1.8, s² = 0.9, Sxx = 5, se(b) = √0.18
    const fit = linearRegression([1, 2, 3, 4], [1, 3, 2, 4]);
    expectClose(fit.slope, 0.8, 1e-12);
    expectClose(fit.intercept, 0.5, 1e-12);
    expectClose(fit.rss, 1.8, 1e-12);
    expectClose(fit.slopeStdError, Math.sqrt(0.18), 1e-12);
    expectClose(fit.rSquared, 0.64, 1e-12);
    // t(0.975, 2) = 4.303 (NIST/SEMATECH e-Handbook 2012)
    expectClose(fit.slopeCi[1] - fit.slope, 4.303 * Math.sqrt(0.18), 0.001);
  });
  it("refuses a vertical line", () => {
    expect(() => linearRegression([2, 2, 2], [1, 2, 3])).toThrow(RangeError);
  });
});
