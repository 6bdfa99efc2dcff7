// GET /api/v1/members — the organisation's members and their roles
import { json, withAuth } from "@/lib/api/handler";
import { memberView } from "@/lib/api/views";
import { listMembers } from "@/lib/auth/members";
import { otherMethods } from "@/lib/api/fallbacks";

export const runtime = "nodejs";

export const GET = withAuth(async ({ principal, db }) => {
  return json({ items: (await listMembers(db, principal.org.id)).map(memberView) });
}, { permission: "members:manage" });

export const { POST, PUT, PATCH, DELETE, OPTIONS } = otherMethods("GET");
