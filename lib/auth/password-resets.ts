// Password reset by e-mailed link: single use, expiring; confirming signs the account out everywhere.
import { and, eq, gt, isNull } from "drizzle-orm";
import type { Db } from "@/db/client";
import { passwordResets, users } from "@/db/schema";
import { ApiError } from "@/lib/api/problem";
import type { Clock } from "@/lib/auth/clock";
import { hashLinkToken, newLinkToken } from "@/lib/auth/link-tokens";
import { hashPassword } from "@/lib/auth/passwords";
import { revokeUserSessions } from "@/lib/auth/sessions";
import { env } from "@/lib/env";
import { passwordResetMail } from "@/lib/mail/messages";
import { sendMailInBackground } from "@/lib/mail/send";

export const RESET_TTL_MS = 30 * 60_000;

/** Same answer whether or not the address has an account; the mail goes out in the background so timing says nothing either. */
export async function requestPasswordReset(db: Db, email: string, clock: Clock): Promise<void> {
  const [user] = await db.select().from(users).where(eq(users.email, email));
  if (!user) return;
  const now = clock.now();
  const { token, tokenHash } = newLinkToken();
  const expiresAt = new Date(now.getTime() + RESET_TTL_MS);
  await db.insert(passwordResets).values({ userId: user.id, tokenHash, createdAt: now, expiresAt });
  const url = new URL(`/reset-password?token=${token}`, env().RILLSCALE_PUBLIC_URL).toString();
  sendMailInBackground(passwordResetMail({ to: user.email, url, expiresAt }));
}

export async function confirmPasswordReset(db: Db, o: { token: string; password: string }, clock: Clock): Promise<void> {
  const now = clock.now();
  const passwordHash = await hashPassword(o.password);
  await db.transaction(async (tx) => {
    const [reset] = await tx.update(passwordResets).set({ usedAt: now })
      .where(and(eq(passwordResets.tokenHash, hashLinkToken(o.token)), isNull(passwordResets.usedAt), gt(passwordResets.expiresAt, now)))
      .returning();
    if (!reset) {
      throw new ApiError("validation", "The reset link is invalid, used or expired.", { errors: [{ pointer: "/token", detail: "is invalid, used or expired" }] });
    }
    await tx.update(users).set({ passwordHash, passwordChangedAt: now }).where(eq(users.id, reset.userId));
    await revokeUserSessions(tx, reset.userId, clock);
  });
}
