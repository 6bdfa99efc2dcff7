// What the provenance and STAC routes share: the organisation's signed record of a job (404 when there is
// none, never confirming another organisation's job) and the audit entry every download writes.
import "server-only";
import { actingOf, type AuthedContext } from "@/lib/api/handler";
import { ApiError } from "@/lib/api/problem";
import { appendAudit } from "@/lib/audit/log";
import { idParamOf } from "@/lib/jobs/params";
import { getProvenance } from "@/lib/provenance/records";

export async function provenanceOf(c: AuthedContext<Record<string, string>>, what: "document" | "signature") {
  const jobId = idParamOf(c.params, "job");
  const row = await getProvenance(c.db, c.principal.org.id, jobId);
  if (!row) throw new ApiError("not-found", `Job ${jobId} has no signed provenance (unknown, not succeeded, or not signed yet).`);
  const acting = actingOf(c.principal, c.ip);
  await appendAudit(c.db, { orgId: acting.orgId, action: "provenance.download", actor: acting.actor, target: `job:${jobId}`, ip: c.ip, details: { what, kid: row.kid } }, c.clock);
  return row;
}
