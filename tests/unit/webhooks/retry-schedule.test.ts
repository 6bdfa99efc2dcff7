import { describe, expect, it } from "vitest";
import { DEFAULT_RETRY_POLICY, nextDelayMs, verdictOf } from "@/lib/webhooks/retry-schedule";

const policy = { maxAttempts: 5, baseDelayMs: 1000, maxDelayMs: 5000 };

describe("nextDelayMs()", () => {
  it("doubles the step per attempt with half of it jittered: bounds at random 0 and 1 (Brooker 2015, equal jitter)", () => {
    expect([1, 2, 3, 4].map((a) => nextDelayMs(a, policy, () => 0))).toEqual([500, 1000, 2000, 2500]);
    expect([1, 2, 3, 4].map((a) => nextDelayMs(a, policy, () => 0.999999))).toEqual([1000, 2000, 4000, 5000]);
  });

  it("gives no further attempt once maxAttempts were made (derived)", () => {
    expect(nextDelayMs(5, policy)).toBeNull();
    expect(nextDelayMs(DEFAULT_RETRY_POLICY.maxAttempts, DEFAULT_RETRY_POLICY)).toBeNull();
  });

  it("every jittered delay stays within [step/2, step] (invariant, derived)", () => {
    for (let i = 0; i < 200; i++) {
      const a = 1 + (i % 4);
      const step = Math.min(5000, 1000 * 2 ** (a - 1));
      const d = nextDelayMs(a, policy)!;
      expect(d).toBeGreaterThanOrEqual(step / 2);
      expect(d).toBeLessThanOrEqual(step);
    }
  });

  it("refuses attempt numbers below 1 (derived)", () => {
    expect(() => nextDelayMs(0, policy)).toThrow(RangeError);
  });
});

describe("verdictOf()", () => {
  it("only 2xx delivers, 410 disables, redirects, errors and no answer retry (Standard Webhooks 1.0)", () => {
    expect([200, 204, 299].map(verdictOf)).toEqual(["delivered", "delivered", "delivered"]);
    expect(verdictOf(410)).toBe("disable");
    expect([301, 302, 400, 404, 500, 503, null].map(verdictOf)).toEqual(Array(7).fill("retry"));
  });
});
