import { describe, it } from "vitest";
import { studentTCdf, studentTQuantile } from "@/lib/stats/student-t";
import { expectClose } from "@/tests/helpers/expect-close";

// Two-sided 95% critical values t(0.975, df), NIST/SEMATECH e-Handbook of Statistical Methods (2012),
// §1.3.6.7.2 "Critical values of the Student's t distribution".
const T975: [number, number][] = [[1, 12.706], [2, 4.303], [5, 2.571], [10, 2.228], [30, 2.042], [100, 1.984]];

describe("studentTQuantile()", () => {
  for (const [df, t] of T975) {
    it(`gives t(0.975, ${df}) = ${t} (NIST/SEMATECH e-Handbook 2012)`, () => {
      expectClose(studentTQuantile(0.975, df), t, 0.0006);
    });
  }
  it("is the inverse of the CDF and antisymmetric (derived)", () => {
    for (const df of [1, 3, 7.5, 40]) {
      for (const p of [0.01, 0.2, 0.6, 0.995]) {
        expectClose(studentTCdf(studentTQuantile(p, df), df), p, 1e-10);
        expectClose(studentTQuantile(1 - p, df), -studentTQuantile(p, df), 1e-9);
      }
    }
  });
  it("gives the Cauchy quantile tan(π(p − ½)) for df = 1 (derived)", () => {
    expectClose(studentTQuantile(0.9, 1), Math.tan(Math.PI * 0.4), 1e-9);
  });
});
