// Sign-in: throttle check before hashing, the same answer and similar work for unknown and known e-mails.
import { asc, eq } from "drizzle-orm";
import type { Db } from "@/db/client";
import { memberships, users } from "@/db/schema";
import { appendAudit } from "@/lib/audit/log";
import type { Clock } from "@/lib/auth/clock";
import { verifyAgainstDummy, verifyPassword } from "@/lib/auth/passwords";
import { issueSession } from "@/lib/auth/sessions";
import { accountBucket, addressBucket, clearThrottle, recordFailure, throttleWait } from "@/lib/auth/throttle";

export type SignInResult =
  | { kind: "ok"; cookie: string; userId: string; orgId: string }
  | { kind: "invalid" }
  | { kind: "throttled"; retryAfterSeconds: number };

export async function signIn(
  db: Db, o: { email: string; password: string; ip: string | null; userAgent: string | null }, clock: Clock,
): Promise<SignInResult> {
  const buckets = [accountBucket(o.email), ...(o.ip ? [addressBucket(o.ip)] : [])];
  const wait = await throttleWait(db, buckets, clock);
  if (wait > 0) return { kind: "throttled", retryAfterSeconds: wait };

  const [user] = await db.select().from(users).where(eq(users.email, o.email));
  const [membership] = user
    ? await db.select().from(memberships).where(eq(memberships.userId, user.id)).orderBy(asc(memberships.joinedAt)).limit(1)
    : [];
  const passwordOk = user ? await verifyPassword(o.password, user.passwordHash) : await verifyAgainstDummy(o.password);
  const orgId = membership?.orgId ?? null;

  if (!user || !passwordOk || !membership) {
    await recordFailure(db, buckets, clock);
    await appendAudit(db, {
      orgId,
      action: "session.sign_in_failed",
      actor: user ? { kind: "user", id: user.id, label: user.email } : { kind: "anonymous", id: null, label: o.email },
      ip: o.ip,
      details: {},
    }, clock);
    return { kind: "invalid" };
  }
  await clearThrottle(db, accountBucket(o.email));
  const { session, cookie } = await issueSession(db, { userId: user.id, orgId: membership.orgId, ip: o.ip, userAgent: o.userAgent }, clock);
  await appendAudit(db, {
    orgId: membership.orgId,
    action: "session.signed_in",
    actor: { kind: "user", id: user.id, label: user.email },
    target: `session:${session.id}`,
    ip: o.ip,
  }, clock);
  return { kind: "ok", cookie, userId: user.id, orgId: membership.orgId };
}
