// GET /api/v1/jobs/{id} — status, stage, progress, timings and the error of a failed job
import { json } from "@/lib/api/handler";
import { idParamOf } from "@/lib/jobs/params";
import { withDataRoute } from "@/lib/jobs/route";
import { getJob } from "@/lib/jobs/submit";
import { jobView } from "@/lib/jobs/views";
import { otherMethods } from "@/lib/api/fallbacks";

export const runtime = "nodejs";

export const GET = withDataRoute(async ({ params, principal, db }) => json(jobView(await getJob(db, principal.org.id, idParamOf(params, "job")))), "jobs:read");

export const { POST, PUT, PATCH, DELETE, OPTIONS } = otherMethods("GET");
