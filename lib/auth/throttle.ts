// Sign-in throttling: failures counted per account and per client address in a fixed window; a bucket over its
// limit is locked for a while. Checked BEFORE any password hashing, so a locked bucket costs no bcrypt work.
import { inArray, sql } from "drizzle-orm";
import type { Db } from "@/db/client";
import { loginThrottles } from "@/db/schema";
import type { Clock } from "@/lib/auth/clock";

interface Limit {
  failures: number;
  windowMs: number;
  lockMs: number;
}

// An account tolerates a few typos; one address may front many people (an office NAT), so it gets more.
export const ACCOUNT_LIMIT: Limit = { failures: 5, windowMs: 15 * 60_000, lockMs: 15 * 60_000 };
export const ADDRESS_LIMIT: Limit = { failures: 50, windowMs: 15 * 60_000, lockMs: 15 * 60_000 };

export const accountBucket = (email: string) => `account:${email}`;
export const addressBucket = (ip: string) => `ip:${ip}`;
const limitOf = (bucket: string) => (bucket.startsWith("account:") ? ACCOUNT_LIMIT : ADDRESS_LIMIT);

/** Seconds until every given bucket is unlocked; 0 when none is locked. */
export async function throttleWait(db: Db, buckets: string[], clock: Clock): Promise<number> {
  const rows = await db.select().from(loginThrottles).where(inArray(loginThrottles.bucket, buckets));
  const now = clock.now().getTime();
  const until = Math.max(0, ...rows.map((r) => (r.lockedUntil ? r.lockedUntil.getTime() : 0)));
  return until > now ? Math.ceil((until - now) / 1000) : 0;
}

export async function recordFailure(db: Db, buckets: string[], clock: Clock) {
  const now = clock.now();
  for (const bucket of buckets) {
    const l = limitOf(bucket);
    const windowStart = new Date(now.getTime() - l.windowMs);
    const lockUntil = new Date(now.getTime() + l.lockMs);
    // One statement per bucket: a new window restarts the count; reaching the limit sets the lock.
    await db.execute(sql`
      INSERT INTO login_throttles (bucket, failures, window_started_at, locked_until)
      VALUES (${bucket}, 1, ${now}, ${l.failures <= 1 ? lockUntil : null})
      ON CONFLICT (bucket) DO UPDATE SET
        failures = CASE WHEN login_throttles.window_started_at < ${windowStart} THEN 1 ELSE login_throttles.failures + 1 END,
        window_started_at = CASE WHEN login_throttles.window_started_at < ${windowStart} THEN ${now} ELSE login_throttles.window_started_at END,
        locked_until = CASE
          WHEN (CASE WHEN login_throttles.window_started_at < ${windowStart} THEN 1 ELSE login_throttles.failures + 1 END) >= ${l.failures}
          THEN ${lockUntil} ELSE login_throttles.locked_until END`);
  }
}

export async function clearThrottle(db: Db, bucket: string) {
  await db.delete(loginThrottles).where(inArray(loginThrottles.bucket, [bucket]));
}
