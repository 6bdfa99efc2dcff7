// POST /api/v1/jobs — queue an analysis (202 + Location; Idempotency-Key honoured); GET /api/v1/jobs — list them
import { actingOf, json, parseJson, parseQuery } from "@/lib/api/handler";
import { queueClient } from "@/jobs/client";
import { fingerprintOf, idempotent } from "@/lib/jobs/idempotency";
import { parseIdempotencyKey } from "@/lib/jobs/idempotency-key";
import { callerId, withDataRoute } from "@/lib/jobs/route";
import { JobCreateBody, JobListQuery } from "@/lib/jobs/schemas";
import { listJobs, submitJob, type JobStatus } from "@/lib/jobs/submit";
import { jobPath, jobView } from "@/lib/jobs/views";
import { otherMethods } from "@/lib/api/fallbacks";

export const runtime = "nodejs";

export const POST = withDataRoute(async ({ req, principal, db, clock, ip }) => {
  const body = await parseJson(req, JobCreateBody);
  const run = async () => {
    const job = await submitJob(db, await queueClient(), clock, actingOf(principal, ip), body);
    return { status: 202, body: jobView(job), headers: { location: jobPath(job.id) } };
  };
  const key = parseIdempotencyKey(req.headers.get("idempotency-key"));
  if (key === null) {
    const r = await run();
    return json(r.body, r.status, r.headers);
  }
  const { response, replayed } = await idempotent(db, clock, { orgId: principal.org.id, principal: callerId(principal), key },
    fingerprintOf("POST", "/api/v1/jobs", body), run);
  return json(response.body, response.status, { ...response.headers, ...(replayed ? { "idempotent-replayed": "true" } : {}) });
}, "jobs:write");

export const GET = withDataRoute(async ({ req, principal, db }) => {
  const q = parseQuery(req, JobListQuery);
  const page = await listJobs(db, principal.org.id, {
    ...q,
    status: q.status ? (q.status.split(",") as JobStatus[]) : undefined,
    createdFrom: q.createdFrom ? new Date(q.createdFrom) : undefined,
    createdTo: q.createdTo ? new Date(q.createdTo) : undefined,
  });
  return json({ items: page.items.map(jobView), nextCursor: page.nextCursor });
}, "jobs:read");

export const { PUT, PATCH, DELETE, OPTIONS } = otherMethods("GET", "POST");
