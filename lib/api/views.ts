// Database rows → the response bodies of lib/api/schemas.ts (dates as ISO strings; secrets and hashes never leave).
import type { ApiKeyRow, AuditEventRow, InvitationRow } from "@/db/schema";
import type { ApiKeyBody, AuditEventBody, InvitationBody, MemberBody } from "@/lib/api/schemas";
import { displayPrefix } from "@/lib/auth/api-keys";
import type { Scope } from "@/lib/auth/permissions";
import type { MemberView } from "@/lib/auth/members";

const iso = (d: Date | null) => (d ? d.toISOString() : null);

export const keyView = (k: ApiKeyRow): ApiKeyBody => ({
  id: k.id,
  name: k.name,
  prefix: displayPrefix(k.id),
  scopes: k.scopes as Scope[],
  createdAt: k.createdAt.toISOString(),
  expiresAt: iso(k.expiresAt),
  lastUsedAt: iso(k.lastUsedAt),
  revokedAt: iso(k.revokedAt),
  rotatedAt: iso(k.rotatedAt),
  graceUntil: iso(k.graceUntil),
});

export const memberView = (m: MemberView): MemberBody => ({ ...m, joinedAt: m.joinedAt.toISOString() });

export const invitationView = (i: InvitationRow): InvitationBody => ({
  id: i.id, email: i.email, role: i.role, expiresAt: i.expiresAt.toISOString(), createdAt: i.createdAt.toISOString(),
});

export const auditView = (e: AuditEventRow): AuditEventBody => ({
  id: String(e.id),
  at: e.at.toISOString(),
  action: e.action,
  actor: { kind: e.actorKind as AuditEventBody["actor"]["kind"], id: e.actorId, label: e.actorLabel },
  target: e.target,
  ip: e.ip,
  details: e.details,
});
