// GET /api/v1/audit/verify — recompute the organisation's audit hash chain and report the first broken row
import { json, withAuth } from "@/lib/api/handler";
import { verifyOrgAudit } from "@/lib/audit/log";
import { otherMethods } from "@/lib/api/fallbacks";

export const runtime = "nodejs";

export const GET = withAuth(async ({ principal, db }) => json(await verifyOrgAudit(db, principal.org.id)), { permission: "audit:read" });

export const { POST, PUT, PATCH, DELETE, OPTIONS } = otherMethods("GET");
