// Job submission and the job queries: parameters validated by the kind's own schema (defaults applied, then
// hashed canonically), the result cache (same dataset bytes + kind + parameters + software version → the earlier
// result, recorded as reused), the queue send, cancel, and the keyset-paginated list.
import { and, desc, eq, gte, inArray, lt, lte, or, sql, type SQL } from "drizzle-orm";
import type PgBoss from "pg-boss";
import { preparedFor, type Db } from "@/db/client";
import { jobResults, jobs, type JobRow } from "@/db/schema";
import { ApiError, type FieldError } from "@/lib/api/problem";
import { appendAudit } from "@/lib/audit/log";
import type { Clock } from "@/lib/auth/clock";
import type { Acting } from "@/lib/datasets/registry";
import { getDataset } from "@/lib/datasets/registry";
import { canonicalJson, sha256Hex } from "@/lib/jobs/canonical-json";
import { decodeCursor, encodeCursor } from "@/lib/jobs/cursor";
import { JOB_QUEUED_CHANNEL, KINDS, queueOf, type JobKind } from "@/lib/jobs/kinds";
import { SOFTWARE } from "@/lib/jobs/software";

export type JobStatus = JobRow["status"];

export interface JobRequest {
  dataset: string;
  kind: JobKind;
  params: Record<string, unknown>;
}

const pointer = (path: PropertyKey[]) => "/params" + path.map((p) => "/" + String(p).replaceAll("~", "~0").replaceAll("/", "~1")).join("");

/** The kind's schema output (defaults filled in); a dataset accepted with an EPSG code passes it on unless overridden. */
function validParams(kind: JobKind, params: Record<string, unknown>, epsgGiven: unknown): Record<string, unknown> {
  const schema = KINDS[kind].params;
  const withEpsg = typeof epsgGiven === "number" && params.epsg === undefined ? { ...params, epsg: epsgGiven } : params;
  const r = schema.safeParse(withEpsg);
  if (!r.success) {
    const errors: FieldError[] = r.error.issues.map((i) => ({ pointer: pointer(i.path), detail: i.message }));
    throw new ApiError("validation", `${errors.length} parameter(s) failed validation for kind ${kind}`, { errors });
  }
  return JSON.parse(JSON.stringify(r.data)) as Record<string, unknown>;
}

export const cacheKeyOf = (datasetSha256: string, kind: JobKind, params: Record<string, unknown>) =>
  sha256Hex(canonicalJson({ dataset: datasetSha256, kind, params, software: `${SOFTWARE.name}@${SOFTWARE.version}` }));

export async function submitJob(db: Db, boss: PgBoss, clock: Clock, acting: Acting, r: JobRequest): Promise<JobRow> {
  const dataset = await getDataset(db, acting.orgId, r.dataset).catch((e: unknown) => {
    if (e instanceof ApiError && e.kind === "not-found") {
      throw new ApiError("validation", `No dataset ${r.dataset}.`, { errors: [{ pointer: "/dataset", detail: "unknown dataset" }] });
    }
    throw e;
  });
  const spec = KINDS[r.kind];
  if (!spec.formats.includes(dataset.format)) {
    throw new ApiError("validation", `Kind ${r.kind} reads ${spec.formats.join(" or ")} datasets; this one is ${dataset.format}.`,
      { errors: [{ pointer: "/dataset", detail: `must be a ${spec.formats.join(" or ")} dataset` }] });
  }
  const params = validParams(r.kind, r.params, (dataset.metadata as { epsgGiven?: unknown }).epsgGiven);
  const cacheKey = cacheKeyOf(dataset.sha256, r.kind, params);
  const now = clock.now();
  const base = { orgId: acting.orgId, datasetId: dataset.id, kind: r.kind, params, cacheKey, submittedBy: acting.actor, createdAt: now, updatedAt: now };

  const [earlier] = await db.select({ job: jobs, result: jobResults }).from(jobs)
    .innerJoin(jobResults, eq(jobResults.jobId, jobs.id))
    .where(and(eq(jobs.orgId, acting.orgId), eq(jobs.cacheKey, cacheKey), eq(jobs.status, "succeeded")))
    .orderBy(jobs.createdAt).limit(1);
  let job: JobRow;
  if (earlier) {
    job = await db.transaction(async (tx) => {
      const [row] = await tx.insert(jobs).values({
        ...base, status: "succeeded", stage: "done", progress: 1, startedAt: now, finishedAt: now,
        cachedFromJobId: earlier.job.cachedFromJobId ?? earlier.job.id,
      }).returning();
      const { jobId: _from, createdAt: _at, ...result } = earlier.result;
      await tx.insert(jobResults).values({ ...result, jobId: row.id });
      return row;
    });
  } else {
    [job] = await db.insert(jobs).values(base).returning();
    try {
      await boss.send(queueOf(r.kind), { jobId: job.id });
    } catch (e) {
      await db.delete(jobs).where(eq(jobs.id, job.id));
      throw e;
    }
    // Only a wake-up (the worker polls anyway): the job is queued, so a failed notify must not answer 500.
    await db.execute(sql`SELECT pg_notify(${JOB_QUEUED_CHANNEL}, ${r.kind})`).catch((e: unknown) => {
      console.error(`[jobs] job ${job.id} queued, but its wake-up notify failed:`, e);
    });
  }
  await appendAudit(db, {
    orgId: acting.orgId, action: "job.create", actor: acting.actor, target: `job:${job.id}`, ip: acting.ip,
    details: { kind: r.kind, dataset: dataset.id, cacheKey, reusedFrom: job.cachedFromJobId },
  }, clock);
  return job;
}

export async function getJob(db: Db, orgId: string, id: string): Promise<JobRow> {
  const [row] = await preparedFor(db, "job_by_id", (d) => d.select().from(jobs)
    .where(and(eq(jobs.orgId, sql.placeholder("orgId")), eq(jobs.id, sql.placeholder("id")))).prepare("job_by_id"))
    .execute({ orgId, id });
  if (!row) throw new ApiError("not-found", `No job ${id}.`);
  return row;
}

/** Queued → cancelled at once; running → cancel requested, the worker stops it at its next heartbeat. */
export async function cancelJob(db: Db, clock: Clock, acting: Acting, id: string): Promise<JobRow> {
  const current = await getJob(db, acting.orgId, id);
  if (current.status === "cancelled") return current;
  if (current.status === "succeeded" || current.status === "failed") {
    throw new ApiError("conflict", `Job ${id} has already ${current.status}.`);
  }
  const now = clock.now();
  const [queued] = await db.update(jobs).set({ status: "cancelled", cancelRequestedAt: now, finishedAt: now, updatedAt: now })
    .where(and(eq(jobs.id, id), eq(jobs.status, "queued"))).returning();
  const row = queued ?? (await db.update(jobs).set({ cancelRequestedAt: now, updatedAt: now })
    .where(and(eq(jobs.id, id), eq(jobs.status, "running"))).returning())[0] ?? (await getJob(db, acting.orgId, id));
  // it ended between the read above and the updates: a cancel can no longer change it
  if (row.status === "succeeded" || row.status === "failed") throw new ApiError("conflict", `Job ${id} has already ${row.status}.`);
  await appendAudit(db, {
    orgId: acting.orgId, action: "job.cancel", actor: acting.actor, target: `job:${id}`, ip: acting.ip, details: { was: current.status },
  }, clock);
  return row;
}

export interface JobFilter {
  limit: number;
  cursor?: string;
  status?: JobStatus[];
  kind?: JobKind;
  dataset?: string;
  createdFrom?: Date;
  createdTo?: Date;
}

export async function listJobs(db: Db, orgId: string, f: JobFilter): Promise<{ items: JobRow[]; nextCursor: string | null }> {
  const conds: SQL[] = [eq(jobs.orgId, orgId)];
  if (f.status?.length) conds.push(inArray(jobs.status, f.status));
  if (f.kind) conds.push(eq(jobs.kind, f.kind));
  if (f.dataset) conds.push(eq(jobs.datasetId, f.dataset));
  if (f.createdFrom) conds.push(gte(jobs.createdAt, f.createdFrom));
  if (f.createdTo) conds.push(lte(jobs.createdAt, f.createdTo));
  if (f.cursor) {
    const c = decodeCursor(f.cursor);
    conds.push(or(lt(jobs.createdAt, c.at), and(eq(jobs.createdAt, c.at), lt(jobs.id, c.id)))!);
  }
  const rows = await db.select().from(jobs).where(and(...conds)).orderBy(desc(jobs.createdAt), desc(jobs.id)).limit(f.limit + 1);
  const items = rows.slice(0, f.limit);
  return { items, nextCursor: rows.length > f.limit ? encodeCursor(items[items.length - 1].createdAt, items[items.length - 1].id) : null };
}

export async function getResult(db: Db, orgId: string, id: string) {
  const job = await getJob(db, orgId, id);
  if (job.status !== "succeeded") {
    throw new ApiError("conflict", job.status === "failed" || job.status === "cancelled"
      ? `Job ${id} ${job.status}; it has no result.` : `Job ${id} is ${job.status}; its result is not ready.`);
  }
  const [result] = await db.select().from(jobResults).where(eq(jobResults.jobId, id));
  if (!result) throw new ApiError("not-found", `No result for job ${id}.`);
  return { job, result };
}
