// GET /api/v1/jobs/{id}/artifacts — the files a succeeded job produced (GeoJSON, GeoTIFF, CSV)
import { json } from "@/lib/api/handler";
import { idParamOf } from "@/lib/jobs/params";
import { withDataRoute } from "@/lib/jobs/route";
import { getResult } from "@/lib/jobs/submit";
import { artifactViews } from "@/lib/jobs/views";
import { otherMethods } from "@/lib/api/fallbacks";

export const runtime = "nodejs";

export const GET = withDataRoute(async ({ params, principal, db }) => {
  const { job, result } = await getResult(db, principal.org.id, idParamOf(params, "job"));
  return json({ items: artifactViews(job.id, result) });
}, "results:read");

export const { POST, PUT, PATCH, DELETE, OPTIONS } = otherMethods("GET");
