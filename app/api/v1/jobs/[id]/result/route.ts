// GET /api/v1/jobs/{id}/result — the pipeline's summary JSON (units, fit evidence) of a succeeded job
import { actingOf, json } from "@/lib/api/handler";
import { appendAudit } from "@/lib/audit/log";
import { idParamOf } from "@/lib/jobs/params";
import { withDataRoute } from "@/lib/jobs/route";
import { SOFTWARE } from "@/lib/jobs/software";
import { getResult } from "@/lib/jobs/submit";
import { otherMethods } from "@/lib/api/fallbacks";

export const runtime = "nodejs";

export const GET = withDataRoute(async ({ params, principal, db, clock, ip }) => {
  const { job, result } = await getResult(db, principal.org.id, idParamOf(params, "job"));
  const acting = actingOf(principal, ip);
  await appendAudit(db, { orgId: acting.orgId, action: "result.read", actor: acting.actor, target: `job:${job.id}`, ip }, clock);
  return json({
    job: job.id, kind: job.kind, cachedFrom: job.cachedFromJobId,
    software: { name: SOFTWARE.name, version: result.softwareVersion }, summary: result.summary, timingsS: result.timingsS,
  });
}, "results:read");

export const { POST, PUT, PATCH, DELETE, OPTIONS } = otherMethods("GET");
