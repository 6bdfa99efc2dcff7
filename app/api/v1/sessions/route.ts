// DELETE /api/v1/sessions — sign out everywhere (every session of the signed-in user)
import { ApiError } from "@/lib/api/problem";
import { noContent, withAuth } from "@/lib/api/handler";
import { appendAudit } from "@/lib/audit/log";
import { clearedSessionCookieHeader, revokeUserSessions } from "@/lib/auth/sessions";
import { otherMethods } from "@/lib/api/fallbacks";

export const runtime = "nodejs";

export const DELETE = withAuth(async ({ principal, db, clock, ip }) => {
  if (principal.kind !== "session") throw new ApiError("forbidden");
  await revokeUserSessions(db, principal.user.id, clock);
  await appendAudit(db, {
    orgId: principal.org.id, action: "session.signed_out_everywhere", actor: { kind: "user", id: principal.user.id, label: principal.user.email }, ip,
  }, clock);
  return noContent({ "set-cookie": clearedSessionCookieHeader() });
}, { sessionOnly: true });

export const { GET, POST, PUT, PATCH, OPTIONS } = otherMethods("DELETE");
