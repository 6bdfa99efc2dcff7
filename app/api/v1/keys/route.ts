// GET /api/v1/keys — the organisation's API keys; POST /api/v1/keys — create an API key (secret shown once)
import { ApiKeyCreateBody } from "@/lib/api/schemas";
import { actingOf, json, parseJson, withAuth } from "@/lib/api/handler";
import { keyView } from "@/lib/api/views";
import { listOrgKeys } from "@/lib/auth/api-keys";
import { issueKey } from "@/lib/auth/key-admin";
import { otherMethods } from "@/lib/api/fallbacks";

export const runtime = "nodejs";

export const GET = withAuth(async ({ principal, db }) => {
  return json({ items: (await listOrgKeys(db, principal.org.id)).map(keyView) });
}, { permission: "keys:manage" });

export const POST = withAuth(async ({ req, principal, db, clock, ip }) => {
  const body = await parseJson(req, ApiKeyCreateBody);
  const { key, secret } = await issueKey(db, actingOf(principal, ip), { ...body, expiresAt: body.expiresAt ? new Date(body.expiresAt) : undefined }, clock);
  return json({ key: keyView(key), secret }, 201);
}, { permission: "keys:manage" });

export const { PUT, PATCH, DELETE, OPTIONS } = otherMethods("GET", "POST");
