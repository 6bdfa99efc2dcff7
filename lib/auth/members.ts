// Organisation membership: list, change role, remove — never leaving an organisation without an admin.
import { and, asc, eq, sql } from "drizzle-orm";
import type { Db } from "@/db/client";
import { memberships, users } from "@/db/schema";
import { ApiError } from "@/lib/api/problem";
import { appendAudit, type AuditInput } from "@/lib/audit/log";
import type { Clock } from "@/lib/auth/clock";
import type { Role } from "@/lib/auth/permissions";
import { revokeUserSessions } from "@/lib/auth/sessions";

export interface MemberView {
  userId: string;
  email: string;
  name: string;
  role: Role;
  joinedAt: Date;
}

const memberColumns = { userId: users.id, email: users.email, name: users.name, role: memberships.role, joinedAt: memberships.joinedAt };

export async function listMembers(db: Db, orgId: string): Promise<MemberView[]> {
  return db.select(memberColumns).from(memberships).innerJoin(users, eq(users.id, memberships.userId))
    .where(eq(memberships.orgId, orgId)).orderBy(asc(memberships.joinedAt));
}

export async function adminEmails(db: Db, orgId: string): Promise<string[]> {
  const rows = await db.select({ email: users.email }).from(memberships).innerJoin(users, eq(users.id, memberships.userId))
    .where(and(eq(memberships.orgId, orgId), eq(memberships.role, "admin")));
  return rows.map((r) => r.email);
}

interface Acting {
  orgId: string;
  actor: AuditInput["actor"];
  ip: string | null;
}

/** Locks the org's memberships so two admins demoting each other cannot both succeed. */
async function lockedMember(tx: Db, orgId: string, userId: string) {
  await tx.execute(sql`SELECT 1 FROM memberships WHERE org_id = ${orgId} FOR UPDATE`);
  const [m] = await tx.select(memberColumns).from(memberships).innerJoin(users, eq(users.id, memberships.userId))
    .where(and(eq(memberships.orgId, orgId), eq(memberships.userId, userId)));
  if (!m) throw new ApiError("not-found", "No such member in this organisation.");
  const [{ admins }] = await tx.select({ admins: sql<number>`count(*)::int` }).from(memberships)
    .where(and(eq(memberships.orgId, orgId), eq(memberships.role, "admin")));
  return { m, admins };
}

export async function changeRole(db: Db, a: Acting, userId: string, role: Role, clock: Clock): Promise<MemberView> {
  return db.transaction(async (tx) => {
    const { m, admins } = await lockedMember(tx, a.orgId, userId);
    if (m.role === "admin" && role !== "admin" && admins <= 1) throw new ApiError("conflict", "This would leave the organisation without an admin.");
    if (m.role === role) return m;
    await tx.update(memberships).set({ role }).where(and(eq(memberships.orgId, a.orgId), eq(memberships.userId, userId)));
    await appendAudit(tx, {
      orgId: a.orgId, action: "member.role_changed", actor: a.actor, target: `user:${userId}`, ip: a.ip,
      details: { email: m.email, from: m.role, to: role },
    }, clock);
    return { ...m, role };
  });
}

export async function removeMember(db: Db, a: Acting, userId: string, clock: Clock): Promise<void> {
  await db.transaction(async (tx) => {
    const { m, admins } = await lockedMember(tx, a.orgId, userId);
    if (m.role === "admin" && admins <= 1) throw new ApiError("conflict", "This would leave the organisation without an admin.");
    await tx.delete(memberships).where(and(eq(memberships.orgId, a.orgId), eq(memberships.userId, userId)));
    await revokeUserSessions(tx, userId, clock, a.orgId);
    await appendAudit(tx, {
      orgId: a.orgId, action: "member.removed", actor: a.actor, target: `user:${userId}`, ip: a.ip, details: { email: m.email, role: m.role },
    }, clock);
  });
}
