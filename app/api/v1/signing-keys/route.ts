// GET /api/v1/signing-keys — the provenance signing keys, active and retired (public facts only)
import { json, withAuth } from "@/lib/api/handler";
import { listSigningKeys } from "@/lib/provenance/keys";
import { otherMethods } from "@/lib/api/fallbacks";

export const runtime = "nodejs";

export const GET = withAuth(async ({ db }) => json({ items: await listSigningKeys(db) }), { permission: "keys:manage" });

export const { POST, PUT, PATCH, DELETE, OPTIONS } = otherMethods("GET");
