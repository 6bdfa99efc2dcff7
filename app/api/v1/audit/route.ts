// GET /api/v1/audit — the organisation's audit events, newest first, filtered and paged by cursor
import { AuditQuery } from "@/lib/api/schemas";
import { json, parseQuery, withAuth } from "@/lib/api/handler";
import { auditView } from "@/lib/api/views";
import { listAudit } from "@/lib/audit/log";
import { otherMethods } from "@/lib/api/fallbacks";

export const runtime = "nodejs";

export const GET = withAuth(async ({ req, principal, db }) => {
  const q = parseQuery(req, AuditQuery);
  const page = await listAudit(db, principal.org.id, {
    ...q, from: q.from ? new Date(q.from) : undefined, to: q.to ? new Date(q.to) : undefined,
  });
  return json({ items: page.items.map(auditView), nextCursor: page.nextCursor });
}, { permission: "audit:read" });

export const { POST, PUT, PATCH, DELETE, OPTIONS } = otherMethods("GET");
