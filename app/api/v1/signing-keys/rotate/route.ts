// POST /api/v1/signing-keys/rotate — a new provenance signing key; earlier keys retire but stay published (audited)
import { actingOf, json, withAuth } from "@/lib/api/handler";
import { appendAudit } from "@/lib/audit/log";
import { env } from "@/lib/env";
import { rotateSigningKey } from "@/lib/provenance/keys";
import { otherMethods } from "@/lib/api/fallbacks";

export const runtime = "nodejs";

export const POST = withAuth(async ({ db, principal, ip, clock }) => {
  const r = await rotateSigningKey(db, env().RILLSCALE_KEY_PEPPER, clock.now());
  const acting = actingOf(principal, ip);
  await appendAudit(db, { orgId: acting.orgId, action: "signing-key.rotate", actor: acting.actor, target: `signing-key:${r.active}`, ip, details: { retired: r.retired } }, clock);
  return json(r);
}, { permission: "keys:manage" });

export const { GET, PUT, PATCH, DELETE, OPTIONS } = otherMethods("POST");
