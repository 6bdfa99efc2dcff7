import { expect } from "vitest";

/** |actual − expected| ≤ tol, with both numbers in the failure message. */
export function expectClose(actual: number, expected: number, tol: number): void {
  expect(Number.isFinite(actual), `expected a finite number close to ${expected}, got ${actual}`).toBe(true);
  expect(Math.abs(actual - expected), `${actual} is not within ${tol} of ${expected}`).toBeLessThanOrEqual(tol);
}
