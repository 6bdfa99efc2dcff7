// When a failed webhook attempt is tried again: exponential backoff with jitter (Brooker 2015, "Exponential
// Backoff And Jitter", AWS Architecture Blog — the "equal jitter" variant: half the step fixed, half random,
// so attempts never bunch up yet never come sooner than half the step).
export interface RetryPolicy {
  /** Attempts in all, the first included. */
  maxAttempts: number;
  /** Delay before the second attempt, before jitter. */
  baseDelayMs: number;
  /** No wait grows beyond this. */
  maxDelayMs: number;
}

/** About 5 s, 10 s, 20 s … capped at an hour: eight attempts span roughly ten minutes plus the cap. */
export const DEFAULT_RETRY_POLICY: RetryPolicy = { maxAttempts: 8, baseDelayMs: 5_000, maxDelayMs: 3_600_000 };

/** The wait after attempt number `attempt` (1-based) failed, or null when no attempt is left. `random` ∈ [0, 1). */
export function nextDelayMs(attempt: number, policy: RetryPolicy, random: () => number = Math.random): number | null {
  if (!Number.isInteger(attempt) || attempt < 1) throw new RangeError(`attempt must be a positive integer, got ${attempt}`);
  if (attempt >= policy.maxAttempts) return null;
  const step = Math.min(policy.maxDelayMs, policy.baseDelayMs * 2 ** (attempt - 1));
  return Math.round(step / 2 + random() * (step / 2));
}

export type AttemptVerdict = "delivered" | "retry" | "disable";

/** Only 2xx delivers; 410 Gone means the receiver wants no more (Standard Webhooks 1.0); anything else retries. */
export function verdictOf(status: number | null): AttemptVerdict {
  if (status !== null && status >= 200 && status < 300) return "delivered";
  if (status === 410) return "disable";
  return "retry";
}
