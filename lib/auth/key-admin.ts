// Key management as an org admin does it: each change is audited, and rotation or revocation e-mails the admins.
import { eq } from "drizzle-orm";
import type { Db } from "@/db/client";
import { organisations, type ApiKeyRow } from "@/db/schema";
import { ApiError } from "@/lib/api/problem";
import { appendAudit, type AuditInput } from "@/lib/audit/log";
import { createApiKey, displayPrefix, findOrgKey, revokeApiKey, rotateApiKey, DEFAULT_GRACE_HOURS } from "@/lib/auth/api-keys";
import type { Clock } from "@/lib/auth/clock";
import { adminEmails } from "@/lib/auth/members";
import type { Scope } from "@/lib/auth/permissions";
import { env } from "@/lib/env";
import { keyChangedMail } from "@/lib/mail/messages";
import { sendMailInBackground } from "@/lib/mail/send";

export interface KeyActing {
  orgId: string;
  actor: AuditInput["actor"];
  userId: string | null;
  ip: string | null;
}

async function requireKey(db: Db, orgId: string, id: string): Promise<ApiKeyRow> {
  const key = await findOrgKey(db, orgId, id);
  // Another organisation's key and a key that does not exist answer the same.
  if (!key) throw new ApiError("not-found", "No such API key.");
  return key;
}

async function notifyAdmins(db: Db, a: KeyActing, key: ApiKeyRow, change: "rotated" | "revoked") {
  const [org] = await db.select().from(organisations).where(eq(organisations.id, a.orgId));
  const to = await adminEmails(db, a.orgId);
  if (to.length) {
    sendMailInBackground(keyChangedMail({ to, orgName: org.name, keyName: key.name, prefix: displayPrefix(key.id), change, by: a.actor.label, graceUntil: key.graceUntil }));
  }
}

export async function issueKey(db: Db, a: KeyActing, o: { name: string; scopes: Scope[]; expiresAt?: Date }, clock: Clock) {
  if (o.expiresAt && o.expiresAt <= clock.now()) {
    throw new ApiError("validation", "The expiry must be in the future.", { errors: [{ pointer: "/expiresAt", detail: "must be in the future" }] });
  }
  const created = await createApiKey(db, env().RILLSCALE_KEY_PEPPER, { orgId: a.orgId, name: o.name, scopes: [...new Set(o.scopes)], expiresAt: o.expiresAt, createdBy: a.userId }, clock);
  await appendAudit(db, {
    orgId: a.orgId, action: "api_key.created", actor: a.actor, target: `api_key:${created.key.id}`, ip: a.ip,
    details: { name: o.name, scopes: created.key.scopes, expiresAt: o.expiresAt?.toISOString() ?? null },
  }, clock);
  return created;
}

export async function rotateKey(db: Db, a: KeyActing, id: string, graceHours: number | undefined, clock: Clock) {
  const key = await requireKey(db, a.orgId, id);
  if (key.revokedAt) throw new ApiError("conflict", "A revoked key cannot be rotated; create a new one.");
  const rotated = await rotateApiKey(db, env().RILLSCALE_KEY_PEPPER, key, graceHours ?? DEFAULT_GRACE_HOURS, clock);
  await appendAudit(db, {
    orgId: a.orgId, action: "api_key.rotated", actor: a.actor, target: `api_key:${id}`, ip: a.ip,
    details: { graceUntil: rotated.key.graceUntil?.toISOString() ?? null },
  }, clock);
  await notifyAdmins(db, a, rotated.key, "rotated");
  return rotated;
}

export async function revokeKey(db: Db, a: KeyActing, id: string, clock: Clock) {
  const key = await requireKey(db, a.orgId, id);
  if (key.revokedAt) return key;
  const revoked = await revokeApiKey(db, key, clock);
  await appendAudit(db, { orgId: a.orgId, action: "api_key.revoked", actor: a.actor, target: `api_key:${id}`, ip: a.ip, details: { name: key.name } }, clock);
  await notifyAdmins(db, a, revoked, "revoked");
  return revoked;
}
