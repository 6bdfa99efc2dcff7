// POST /api/v1/session — sign in with e-mail and password; DELETE /api/v1/session — sign out this session
import { ApiError } from "@/lib/api/problem";
import { SignInBody } from "@/lib/api/schemas";
import { noContent, parseJson, withAuth, withPublic } from "@/lib/api/handler";
import { appendAudit } from "@/lib/audit/log";
import { clearedSessionCookieHeader, revokeSession } from "@/lib/auth/sessions";
import { signIn } from "@/lib/auth/sign-in";
import { otherMethods } from "@/lib/api/fallbacks";

export const runtime = "nodejs";

export const POST = withPublic(async ({ req, db, clock, ip, userAgent }) => {
  const body = await parseJson(req, SignInBody);
  const r = await signIn(db, { ...body, ip, userAgent }, clock);
  if (r.kind === "throttled") {
    throw new ApiError("too-many-requests", `Too many failed sign-ins; try again in ${r.retryAfterSeconds} s.`, {
      headers: { "retry-after": String(r.retryAfterSeconds) },
    });
  }
  if (r.kind === "invalid") throw new ApiError("unauthenticated", "The e-mail or password is wrong.");
  return noContent({ "set-cookie": r.cookie });
});

export const DELETE = withAuth(async ({ principal, db, clock, ip }) => {
  if (principal.kind !== "session") throw new ApiError("forbidden");
  await revokeSession(db, principal.session.id, clock);
  await appendAudit(db, {
    orgId: principal.org.id, action: "session.signed_out", actor: { kind: "user", id: principal.user.id, label: principal.user.email },
    target: `session:${principal.session.id}`, ip,
  }, clock);
  return noContent({ "set-cookie": clearedSessionCookieHeader() });
}, { sessionOnly: true });

export const { GET, PUT, PATCH, OPTIONS } = otherMethods("POST", "DELETE");
