// POST /api/v1/keys/{id}/revoke — refuse the key from now on
import { KeyIdParams } from "@/lib/api/schemas";
import { actingOf, json, withAuth } from "@/lib/api/handler";
import { ApiError } from "@/lib/api/problem";
import { keyView } from "@/lib/api/views";
import { revokeKey } from "@/lib/auth/key-admin";
import { otherMethods } from "@/lib/api/fallbacks";

export const runtime = "nodejs";

export const POST = withAuth(async ({ params, principal, db, clock, ip }) => {
  const p = KeyIdParams.safeParse(params);
  if (!p.success) throw new ApiError("not-found", "No such API key.");
  return json({ key: keyView(await revokeKey(db, actingOf(principal, ip), p.data.id, clock)) });
}, { permission: "keys:manage" });

export const { GET, PUT, PATCH, DELETE, OPTIONS } = otherMethods("POST");
