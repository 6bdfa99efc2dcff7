// GET /api/v1/jobs/{id}/provenance.jws — the detached JWS (RFC 7797) of the provenance document, compact form (audited)
import { withAuth } from "@/lib/api/handler";
import { provenanceOf } from "@/lib/provenance/route-helpers";
import { otherMethods } from "@/lib/api/fallbacks";

export const runtime = "nodejs";

export const GET = withAuth(async (c) => {
  const row = await provenanceOf(c, "signature");
  return new Response(row.jws, { headers: { "content-type": "application/jose", "content-disposition": `attachment; filename="provenance-${row.jobId}.jws"` } });
}, { permission: "provenance:read" });

export const { POST, PUT, PATCH, DELETE, OPTIONS } = otherMethods("GET");
