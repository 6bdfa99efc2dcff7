// POST /api/v1/keys/{id}/rotate — new secret; the previous one keeps working for the grace period (default 24 h)
import { ApiKeyRotateBody, KeyIdParams } from "@/lib/api/schemas";
import { actingOf, json, parseJson, withAuth } from "@/lib/api/handler";
import { ApiError } from "@/lib/api/problem";
import { keyView } from "@/lib/api/views";
import { rotateKey } from "@/lib/auth/key-admin";
import { otherMethods } from "@/lib/api/fallbacks";

export const runtime = "nodejs";

export const POST = withAuth(async ({ req, params, principal, db, clock, ip }) => {
  const p = KeyIdParams.safeParse(params);
  if (!p.success) throw new ApiError("not-found", "No such API key.");
  const { graceHours } = await parseJson(req, ApiKeyRotateBody);
  const { key, secret } = await rotateKey(db, actingOf(principal, ip), p.data.id, graceHours, clock);
  return json({ key: keyView(key), secret });
}, { permission: "keys:manage" });

export const { GET, PUT, PATCH, DELETE, OPTIONS } = otherMethods("POST");
