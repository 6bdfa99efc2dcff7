// Purging what can no longer be used: ended sessions, spent or expired link tokens, stale throttle buckets.
// Run by the worker's maintenance queue; safe to run twice (at-least-once delivery).
import { and, isNull, lt, or } from "drizzle-orm";
import type { Db } from "@/db/client";
import { invitations, loginThrottles, passwordResets, sessions } from "@/db/schema";
import type { Clock } from "@/lib/auth/clock";
import { ACCOUNT_LIMIT, ADDRESS_LIMIT } from "@/lib/auth/throttle";

// Kept a day after they end, so a support question about "why was I signed out" can still be answered.
const KEEP_ENDED_MS = 24 * 3_600_000;

export async function purgeExpired(db: Db, clock: Clock): Promise<Record<string, number>> {
  const now = clock.now().getTime();
  const ended = new Date(now - KEEP_ENDED_MS);
  const windowOver = new Date(now - Math.max(ACCOUNT_LIMIT.windowMs, ADDRESS_LIMIT.windowMs, ACCOUNT_LIMIT.lockMs, ADDRESS_LIMIT.lockMs));
  const s = await db.delete(sessions).where(or(lt(sessions.expiresAt, ended), lt(sessions.revokedAt, ended))).returning({ id: sessions.id });
  const r = await db.delete(passwordResets).where(or(lt(passwordResets.expiresAt, ended), lt(passwordResets.usedAt, ended))).returning({ id: passwordResets.id });
  const i = await db.delete(invitations).where(lt(invitations.expiresAt, ended)).returning({ id: invitations.id });
  const t = await db.delete(loginThrottles).where(and(lt(loginThrottles.windowStartedAt, windowOver), or(isNull(loginThrottles.lockedUntil), lt(loginThrottles.lockedUntil, new Date(now))))).returning({ b: loginThrottles.bucket });
  return { sessions: s.length, passwordResets: r.length, invitations: i.length, throttles: t.length };
}
