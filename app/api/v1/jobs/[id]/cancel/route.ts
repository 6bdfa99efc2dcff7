// POST /api/v1/jobs/{id}/cancel — a queued job is cancelled at once, a running one at the worker's next check
import { actingOf, json } from "@/lib/api/handler";
import { idParamOf } from "@/lib/jobs/params";
import { withDataRoute } from "@/lib/jobs/route";
import { cancelJob } from "@/lib/jobs/submit";
import { jobView } from "@/lib/jobs/views";
import { otherMethods } from "@/lib/api/fallbacks";

export const runtime = "nodejs";

export const POST = withDataRoute(async ({ params, principal, db, clock, ip }) => {
  const job = await cancelJob(db, clock, actingOf(principal, ip), idParamOf(params, "job"));
  return json(jobView(job), job.status === "cancelled" ? 200 : 202);
}, "jobs:write");

export const { GET, PUT, PATCH, DELETE, OPTIONS } = otherMethods("POST");
