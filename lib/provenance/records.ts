// Signed provenance records of succeeded jobs: the facts gathered from our tables (job, dataset, result,
// organisation, submitter), the PROV-JSON built and signed once, stored with its JWS, and read back by id.
import { createHash } from "node:crypto";
import { and, eq } from "drizzle-orm";
import type { Db } from "@/db/client";
import { datasets, jobProvenance, jobResults, jobs, organisations, type JobProvenanceRow } from "@/db/schema";
import { isJobKind } from "@/lib/jobs/kinds";
import { SOFTWARE } from "@/lib/jobs/software";
import { signDetached } from "@/lib/provenance/detached-jws";
import { activeSigningKey } from "@/lib/provenance/keys";
import { geographicInput, methodsOf } from "@/lib/provenance/methods";
import { buildProvDocument, provDocumentBytes, type ProvJobFacts } from "@/lib/provenance/prov-json";

export class ProvenanceUnavailableError extends Error {
  constructor(message: string) {
    super(message);
    this.name = "ProvenanceUnavailableError";
  }
}

/** The worker id is `host:pid:random` (jobs/handlers/register.ts); the document names the host only. */
const hostOf = (workerId: string | null) => (workerId ? workerId.split(":")[0] : null);

export async function jobFacts(db: Db, jobId: string, gitCommit: string | null): Promise<ProvJobFacts> {
  const [row] = await db.select({ job: jobs, result: jobResults, org: organisations }).from(jobs)
    .innerJoin(jobResults, eq(jobResults.jobId, jobs.id)).innerJoin(organisations, eq(organisations.id, jobs.orgId))
    .where(eq(jobs.id, jobId));
  if (!row || row.job.status !== "succeeded") throw new ProvenanceUnavailableError(`job ${jobId} has no result to describe`);
  const { job, result, org } = row;
  if (!job.datasetId) throw new ProvenanceUnavailableError(`the dataset of job ${jobId} was deleted`);
  const { kind } = job;
  if (!isJobKind(kind)) throw new ProvenanceUnavailableError(`job ${jobId} is of an unknown kind ${kind}`);
  const [dataset] = await db.select().from(datasets).where(eq(datasets.id, job.datasetId));
  const finishedAt = job.finishedAt ?? job.updatedAt;
  return {
    job: {
      id: job.id, kind: job.kind, attempts: job.attempts, workerHost: hostOf(job.workerId), cachedFrom: job.cachedFromJobId,
      startedAt: job.startedAt ?? finishedAt, finishedAt,
    },
    dataset: { id: dataset.id, name: dataset.name, sha256: dataset.sha256, mediaType: dataset.mediaType, sizeBytes: dataset.sizeBytes, uploadedAt: dataset.createdAt },
    params: job.params,
    artifacts: result.artifacts.map((a) => ({ name: a.name, sha256: a.sha256, mediaType: a.mediaType, sizeBytes: a.size })),
    software: { name: SOFTWARE.name, version: result.softwareVersion, gitCommit },
    org: { id: org.id, name: org.name },
    submitter: {
      kind: job.submittedBy.kind === "user" ? "user" : "api_key",
      id: job.submittedBy.id ?? "unknown", label: job.submittedBy.label,
    },
    methods: methodsOf(kind, job.params, { geographic: geographicInput(kind, result.summary) }),
  };
}

/** Builds, signs and stores the document of a succeeded job; a second call keeps the first record. */
export async function recordProvenance(db: Db, jobId: string, serverSecret: string, gitCommit: string | null): Promise<JobProvenanceRow> {
  const [existing] = await db.select().from(jobProvenance).where(eq(jobProvenance.jobId, jobId));
  if (existing) return existing;
  const facts = await jobFacts(db, jobId, gitCommit);
  const bytes = provDocumentBytes(buildProvDocument(facts));
  const key = await activeSigningKey(db, serverSecret);
  const jws = await signDetached(bytes, key.privateKey, key.kid);
  const [orgRow] = await db.select({ orgId: jobs.orgId }).from(jobs).where(eq(jobs.id, jobId));
  const [row] = await db.insert(jobProvenance).values({
    jobId, orgId: orgRow.orgId, document: Buffer.from(bytes).toString("utf8"),
    documentSha256: createHash("sha256").update(bytes).digest("hex"), jws, kid: key.kid,
  }).onConflictDoNothing().returning();
  return row ?? (await db.select().from(jobProvenance).where(eq(jobProvenance.jobId, jobId)))[0];
}

/** The organisation's record of a job, or null (unknown, another org's, or not signed yet). */
export async function getProvenance(db: Db, orgId: string, jobId: string): Promise<JobProvenanceRow | null> {
  const [row] = await db.select().from(jobProvenance).where(and(eq(jobProvenance.jobId, jobId), eq(jobProvenance.orgId, orgId)));
  return row ?? null;
}
