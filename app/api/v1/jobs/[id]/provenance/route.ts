// GET /api/v1/jobs/{id}/provenance — the signed W3C PROV-JSON document, byte for byte as signed (audited)
import { withAuth } from "@/lib/api/handler";
import { provenanceOf } from "@/lib/provenance/route-helpers";
import { otherMethods } from "@/lib/api/fallbacks";

export const runtime = "nodejs";

export const GET = withAuth(async (c) => {
  const row = await provenanceOf(c, "document");
  return new Response(Buffer.from(row.document, "utf8"), {
    headers: {
      "content-type": "application/json", etag: `"${row.documentSha256}"`,
      link: `</api/v1/jobs/${row.jobId}/provenance.jws>; rel="signature"; type="application/jose"`,
      "content-disposition": `attachment; filename="provenance-${row.jobId}.json"`,
    },
  });
}, { permission: "provenance:read" });

export const { POST, PUT, PATCH, DELETE, OPTIONS } = otherMethods("GET");
