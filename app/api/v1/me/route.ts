// GET /api/v1/me — who the caller is: organisation, and role (session) or scopes (API key), with permissions
import type { MeBody } from "@/lib/api/schemas";
import { json, withAuth } from "@/lib/api/handler";
import { otherMethods } from "@/lib/api/fallbacks";

export const runtime = "nodejs";

export const GET = withAuth(async ({ principal: p }) => {
  const org = { id: p.org.id, name: p.org.name, slug: p.org.slug };
  const body: MeBody =
    p.kind === "session"
      ? { kind: "session", user: { id: p.user.id, email: p.user.email, name: p.user.name }, org, role: p.role, permissions: p.permissions }
      : { kind: "api_key", org, scopes: p.scopes, permissions: p.permissions };
  return json(body);
});

export const { POST, PUT, PATCH, DELETE, OPTIONS } = otherMethods("GET");
