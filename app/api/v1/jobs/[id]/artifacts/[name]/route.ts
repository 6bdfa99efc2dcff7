// GET /api/v1/jobs/{id}/artifacts/{name} — download one artifact (Content-Length, ETag, byte ranges)
import { actingOf } from "@/lib/api/handler";
import { ApiError } from "@/lib/api/problem";
import { appendAudit } from "@/lib/audit/log";
import { artifactResponse } from "@/lib/jobs/artifacts";
import { objectStore } from "@/lib/jobs/config";
import { withDataRoute } from "@/lib/jobs/route";
import { ArtifactParams } from "@/lib/jobs/schemas";
import { getResult } from "@/lib/jobs/submit";
import { otherMethods } from "@/lib/api/fallbacks";

export const runtime = "nodejs";

export const GET = withDataRoute<{ id: string; name: string }>(async ({ req, params, principal, db, clock, ip }) => {
  const p = ArtifactParams.safeParse(params);
  if (!p.success) throw new ApiError("not-found", "No such artifact.");
  const { job, result } = await getResult(db, principal.org.id, p.data.id);
  const artifact = result.artifacts.find((a) => a.name === p.data.name);
  if (!artifact) throw new ApiError("not-found", `Job ${job.id} has no artifact ${p.data.name}.`);
  const acting = actingOf(principal, ip);
  await appendAudit(db, {
    orgId: acting.orgId, action: "artifact.download", actor: acting.actor, target: `job:${job.id}`, ip,
    details: { name: artifact.name, range: req.headers.get("range") },
  }, clock);
  return artifactResponse(objectStore(), artifact, req);
}, "results:read");

export const { POST, PUT, PATCH, DELETE, OPTIONS } = otherMethods("GET");
