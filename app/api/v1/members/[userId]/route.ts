// PATCH /api/v1/members/{userId} — change a member's role; DELETE /api/v1/members/{userId} — remove a member
import { MemberRoleBody, UserIdParams } from "@/lib/api/schemas";
import { actingOf, json, noContent, parseJson, withAuth } from "@/lib/api/handler";
import { ApiError } from "@/lib/api/problem";
import { memberView } from "@/lib/api/views";
import { changeRole, removeMember } from "@/lib/auth/members";
import { otherMethods } from "@/lib/api/fallbacks";

export const runtime = "nodejs";

// A malformed id names no member: the same 404 as an unknown or another organisation's member.
function userIdOf(params: unknown): string {
  const r = UserIdParams.safeParse(params);
  if (!r.success) throw new ApiError("not-found", "No such member in this organisation.");
  return r.data.userId;
}

export const PATCH = withAuth(async ({ req, params, principal, db, clock, ip }) => {
  const userId = userIdOf(params);
  const { role } = await parseJson(req, MemberRoleBody);
  const m = await changeRole(db, actingOf(principal, ip), userId, role, clock);
  return json(memberView(m));
}, { permission: "members:manage" });

export const DELETE = withAuth(async ({ params, principal, db, clock, ip }) => {
  await removeMember(db, actingOf(principal, ip), userIdOf(params), clock);
  return noContent();
}, { permission: "members:manage" });

export const { GET, POST, PUT, OPTIONS } = otherMethods("PATCH", "DELETE");
