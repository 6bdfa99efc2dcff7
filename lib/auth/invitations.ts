// Invitations: an admin invites an e-mail address with a role; the link (single use, expiring) lets the invitee
// choose a name and password, or — when the address already has an account — confirm it with their password.
import { and, desc, eq, gt, isNull } from "drizzle-orm";
import type { Db } from "@/db/client";
import { invitations, memberships, organisations, users, type InvitationRow } from "@/db/schema";
import { ApiError } from "@/lib/api/problem";
import { appendAudit, type AuditInput } from "@/lib/audit/log";
import type { Clock } from "@/lib/auth/clock";
import { hashLinkToken, newLinkToken } from "@/lib/auth/link-tokens";
import { hashPassword, verifyPassword } from "@/lib/auth/passwords";
import type { Role } from "@/lib/auth/permissions";
import { issueSession } from "@/lib/auth/sessions";
import { env } from "@/lib/env";
import { invitationMail } from "@/lib/mail/messages";
import { sendMail } from "@/lib/mail/send";

export const INVITATION_TTL_MS = 7 * 24 * 3_600_000;

export async function createInvitation(
  db: Db, a: { orgId: string; actor: AuditInput["actor"]; userId: string | null; ip: string | null },
  o: { email: string; role: Role }, clock: Clock,
): Promise<InvitationRow> {
  const [member] = await db.select({ id: users.id }).from(users).innerJoin(memberships, eq(memberships.userId, users.id))
    .where(and(eq(users.email, o.email), eq(memberships.orgId, a.orgId)));
  if (member) throw new ApiError("conflict", `${o.email} is already a member.`);
  const [org] = await db.select().from(organisations).where(eq(organisations.id, a.orgId));
  const now = clock.now();
  const { token, tokenHash } = newLinkToken();
  const [inv] = await db.insert(invitations).values({
    orgId: a.orgId, email: o.email, role: o.role, tokenHash, invitedBy: a.userId, createdAt: now,
    expiresAt: new Date(now.getTime() + INVITATION_TTL_MS),
  }).returning();
  const url = new URL(`/accept-invite?token=${token}`, env().RILLSCALE_PUBLIC_URL).toString();
  try {
    await sendMail(invitationMail({ to: o.email, orgName: org.name, role: o.role, url, expiresAt: inv.expiresAt }));
  } catch (e) {
    await db.delete(invitations).where(eq(invitations.id, inv.id));
    throw new ApiError("bad-gateway", `The invitation e-mail could not be sent (${(e as Error).message}).`);
  }
  await appendAudit(db, {
    orgId: a.orgId, action: "member.invited", actor: a.actor, target: `invitation:${inv.id}`, ip: a.ip, details: { email: o.email, role: o.role },
  }, clock);
  return inv;
}

export async function listPendingInvitations(db: Db, orgId: string, clock: Clock): Promise<InvitationRow[]> {
  return db.select().from(invitations)
    .where(and(eq(invitations.orgId, orgId), isNull(invitations.acceptedAt), gt(invitations.expiresAt, clock.now())))
    .orderBy(desc(invitations.createdAt));
}

const badToken = () =>
  new ApiError("validation", "The invitation link is invalid, used or expired.", { errors: [{ pointer: "/token", detail: "is invalid, used or expired" }] });

/** Accepts once: marks the invitation used, creates the user if needed and the membership, and signs them in. */
export async function acceptInvitation(
  db: Db, o: { token: string; name: string; password: string; ip: string | null; userAgent: string | null }, clock: Clock,
): Promise<{ cookie: string; userId: string; orgId: string }> {
  const now = clock.now();
  // Hash before the transaction: bcrypt's work should not hold row locks.
  const newHash = await hashPassword(o.password);
  return db.transaction(async (tx) => {
    const [inv] = await tx.update(invitations).set({ acceptedAt: now })
      .where(and(eq(invitations.tokenHash, hashLinkToken(o.token)), isNull(invitations.acceptedAt), gt(invitations.expiresAt, now)))
      .returning();
    if (!inv) throw badToken();
    let [user] = await tx.select().from(users).where(eq(users.email, inv.email));
    if (user) {
      if (!(await verifyPassword(o.password, user.passwordHash))) {
        throw new ApiError("validation", "This e-mail already has an account; enter its current password to join.", {
          errors: [{ pointer: "/password", detail: "does not match the existing account" }],
        });
      }
    } else {
      [user] = await tx.insert(users).values({ email: inv.email, name: o.name, passwordHash: newHash, createdAt: now, passwordChangedAt: now }).returning();
    }
    await tx.insert(memberships).values({ orgId: inv.orgId, userId: user.id, role: inv.role, joinedAt: now }).onConflictDoNothing();
    await appendAudit(tx, {
      orgId: inv.orgId, action: "member.joined", actor: { kind: "user", id: user.id, label: user.email },
      target: `invitation:${inv.id}`, ip: o.ip, details: { role: inv.role },
    }, clock);
    const { cookie } = await issueSession(tx, { userId: user.id, orgId: inv.orgId, ip: o.ip, userAgent: o.userAgent }, clock);
    return { cookie, userId: user.id, orgId: inv.orgId };
  });
}
