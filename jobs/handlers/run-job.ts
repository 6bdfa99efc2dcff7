// Runs one delivery of a queued job in the worker: claim it in our jobs table (the source of truth; pg-boss only
// delivers, at least once), run its handler in a worker thread, write heartbeats and progress, honour cancels,
// then store the artifacts (atomic puts under fixed keys, so a retry overwrites itself) and upsert the result.
import { mkdtemp, readFile, rm } from "node:fs/promises";
import { tmpdir } from "node:os";
import path from "node:path";
import { Worker } from "node:worker_threads";
import { createReadStream } from "node:fs";
import { pathToFileURL } from "node:url";
import { and, eq, isNull, lt, ne, sql } from "drizzle-orm";
import type { Db } from "@/db/client";
import { datasets, jobResults, jobs, type JobRow } from "@/db/schema";
import type { ThreadJob, ThreadMessage } from "@/jobs/handlers/thread";
import type { HandlerInput, HandlerOutput } from "@/jobs/handlers/types";
import { PROBLEM_BASE, PROBLEM_TYPES } from "@/lib/api/problem";
import { appendAudit } from "@/lib/audit/log";
import { systemClock } from "@/lib/auth/clock";
import { streamToStore } from "@/lib/ingest/stream-to-store";
import type { StoredArtifact } from "@/lib/jobs/artifacts";
import type { JobKind } from "@/lib/jobs/kinds";
import { SOFTWARE } from "@/lib/jobs/software";
import { storeNetworkFeatures } from "@/lib/features/store-network-features";
import { artifactKey, LocalDiskStore, type ObjectStore } from "@/lib/storage";

/** How often a running job's row is touched (heartbeat, progress, cancel check): "every few seconds". */
export const HEARTBEAT_MS = 1_000;
const THREAD_ENTRY = pathToFileURL(path.join(process.cwd(), "jobs", "handlers", "thread.ts")).href;
// A worker thread does not inherit the main thread's module hooks, so it registers tsx itself before loading
// the TypeScript entry (the worker process runs from source under `node --import tsx`).
const THREAD_BOOT = `(async () => { const { register } = await import(${JSON.stringify(import.meta.resolve("tsx/esm/api"))}); register(); await import(${JSON.stringify(THREAD_ENTRY)}); })();`;
const WORKER_ACTOR = { kind: "system" as const, id: null, label: "job worker" };

/** One analysis thread started ahead of the next job: tsx's registration and the pipelines' modules take most
 *  of a second (more on a busy machine), paid while the worker is idle instead of inside a job. */
let spareThread: Worker | null = null;

/** geotiff.js's decoder pool (web-worker) reads `workerData.mod` in any non-main thread to tell whether it is
 *  one of its own; an object without `mod` tells it that it is not. The job itself comes by message. */
const startThread = () => new Worker(THREAD_BOOT, { eval: true, workerData: {} });

/** Starts the spare thread if there is none (at boot, and after each job). */
export function prestartThread(): void {
  if (spareThread) return;
  const thread = startThread();
  thread.unref(); // an idle spare does not keep the worker process alive
  // a spare that fails to load is dropped; the next job starts its own thread and reports the failure
  thread.on("error", (e) => console.error(`[worker] spare analysis thread: ${e.message}`));
  thread.once("exit", () => {
    if (spareThread === thread) spareThread = null;
  });
  spareThread = thread;
}

function takeThread(): Worker {
  const thread = spareThread ?? startThread();
  spareThread = null;
  thread.ref();
  return thread;
}

export interface RunContext {
  db: Db;
  store: ObjectStore;
  workerId: string;
  staleSeconds: number;
  orgMaxRunning: number;
}

export type RunOutcome = "succeeded" | "failed" | "cancelled" | "skipped" | "deferred" | "lost";

/** Claims the job for this worker: queued, or running under a worker whose heartbeat went stale (it died). */
async function claim(c: RunContext, jobId: string): Promise<{ job: JobRow } | { outcome: RunOutcome }> {
  return c.db.transaction(async (tx) => {
    const [job] = await tx.select().from(jobs).where(eq(jobs.id, jobId)).for("update");
    if (!job || job.status === "succeeded" || job.status === "failed" || job.status === "cancelled") return { outcome: "skipped" as const };
    const staleBefore = new Date(Date.now() - c.staleSeconds * 1000);
    if (job.status === "running" && job.heartbeatAt && job.heartbeatAt > staleBefore) return { outcome: "skipped" as const };
    // one org's running jobs are counted under its lock, so two workers cannot both take the last slot
    await tx.execute(sql`SELECT pg_advisory_xact_lock(hashtextextended(${"jobs-org:" + job.orgId}, 0))`);
    const [{ n }] = await tx.select({ n: sql<number>`count(*)::int` }).from(jobs)
      .where(and(eq(jobs.orgId, job.orgId), eq(jobs.status, "running"), ne(jobs.id, jobId)));
    if (n >= c.orgMaxRunning) return { outcome: "deferred" as const };
    const now = new Date();
    const [claimed] = await tx.update(jobs).set({
      status: "running", attempts: job.attempts + 1, workerId: c.workerId, heartbeatAt: now, updatedAt: now,
      startedAt: job.startedAt ?? now, stage: "starting", progress: 0, error: null,
    }).where(eq(jobs.id, jobId)).returning();
    return { job: claimed };
  });
}

/** Local store: read the object where it lies; otherwise download it once into the attempt's directory. */
async function datasetFile(store: ObjectStore, key: string, outDir: string): Promise<string> {
  if (store instanceof LocalDiskStore) return path.join(store.root, ...key.split("/"));
  const file = path.join(outDir, "input");
  const { body } = await store.get(key);
  const { createWriteStream } = await import("node:fs");
  const { pipeline } = await import("node:stream/promises");
  await pipeline(body, createWriteStream(file));
  return file;
}

async function removeArtifacts(store: ObjectStore, jobId: string) {
  for await (const key of store.list(`jobs/${jobId}/`)) await store.delete(key);
}

type ThreadEnd = { kind: "done"; output: HandlerOutput } | { kind: "error"; error: { name: string; code: string | null; message: string } } | { kind: "stopped"; why: "cancelled" | "lost" };

/** Runs the handler in a thread; each heartbeat writes stage/progress and reads back whether to stop. */
function runThread(c: RunContext, job: JobRow, input: HandlerInput): Promise<ThreadEnd> {
  return new Promise((resolve) => {
    const thread = takeThread();
    thread.postMessage({ kind: job.kind as JobKind, input } satisfies ThreadJob);
    let stage = "starting", progress = 0, ended = false, writing = false;
    const end = (e: ThreadEnd) => {
      if (ended) return;
      ended = true;
      clearInterval(beat);
      if (e.kind === "stopped") void thread.terminate();
      resolve(e);
    };
    const heartbeat = async () => {
      if (writing || ended) return;
      writing = true;
      try {
        const now = new Date();
        const [row] = await c.db.update(jobs).set({ heartbeatAt: now, updatedAt: now, stage, progress })
          .where(and(eq(jobs.id, job.id), eq(jobs.workerId, c.workerId), eq(jobs.status, "running")))
          .returning({ cancelRequestedAt: jobs.cancelRequestedAt });
        if (!row) end({ kind: "stopped", why: "lost" }); // another worker took it over, or it was finished elsewhere
        else if (row.cancelRequestedAt) end({ kind: "stopped", why: "cancelled" });
      } catch (e) {
        console.error(`[worker] heartbeat of job ${job.id}: ${(e as Error).message}`);
      } finally {
        writing = false;
      }
    };
    const beat = setInterval(() => void heartbeat(), HEARTBEAT_MS);
    thread.on("message", (m: ThreadMessage) => {
      if (m.type === "progress") {
        const changed = m.stage !== stage;
        stage = m.stage;
        progress = Math.min(1, Math.max(progress, m.fraction));
        if (changed) void heartbeat();
      } else if (m.type === "done") end({ kind: "done", output: m.output });
      else end({ kind: "error", error: m.error });
    });
    thread.on("error", (e) => end({ kind: "error", error: { name: e.name, code: null, message: e.message } }));
    thread.on("exit", (code) => end({ kind: "error", error: { name: "Error", code: "worker_exit", message: `the analysis thread exited (code ${code})` } }));
  });
}

function failureProblem(jobId: string, e: { name: string; code: string | null; message: string }) {
  // RangeError / RasterError / VectorError: the input or the parameters cannot give a result (a 422 in kind)
  const input = e.name === "RangeError" || e.name === "RasterError" || e.name === "VectorError" || e.name === "ZodError";
  const kind = input ? "job-input" : "job-internal";
  return {
    type: PROBLEM_BASE + kind,
    title: PROBLEM_TYPES[kind].title,
    status: PROBLEM_TYPES[kind].status,
    detail: input ? e.message : "The analysis stopped unexpectedly; quote the job id when reporting it.",
    instance: `/api/v1/jobs/${jobId}`,
    ...(input && e.code ? { code: e.code } : {}),
  };
}

/** Ends a running job of ours with status `to` (only if it is still ours and running). */
async function finish(c: RunContext, job: JobRow, to: "failed" | "cancelled", error: Record<string, unknown> | null) {
  const now = new Date();
  const [row] = await c.db.update(jobs).set({ status: to, error, finishedAt: now, updatedAt: now, heartbeatAt: now })
    .where(and(eq(jobs.id, job.id), eq(jobs.workerId, c.workerId), eq(jobs.status, "running"))).returning();
  if (row) await appendAudit(c.db, { orgId: job.orgId, action: `job.${to}`, actor: WORKER_ACTOR, target: `job:${job.id}`, details: { kind: job.kind } }, systemClock);
}

/** Stores every artifact (each put atomic and synced on its own) and commits the result with the stream links in
 *  PostGIS, atomically; `done` is false when the job stopped being ours and running meanwhile (cancelled, taken over). */
/**
 * All artifacts at once. Every put settles before this returns, so none lands after the job was handed back and its
 * outDir removed; if one failed, none of this job's artifacts stay and the first error is thrown.
 */
async function storeArtifacts(c: RunContext, job: JobRow, output: HandlerOutput): Promise<StoredArtifact[]> {
  const settled = await Promise.allSettled(output.artifacts.map(async (a): Promise<StoredArtifact> => {
    const key = artifactKey(job.id, a.name);
    const put = await streamToStore(createReadStream(a.path), c.store, key, { maxBytes: Number.MAX_SAFE_INTEGER, contentType: a.mediaType });
    return { name: a.name, mediaType: a.mediaType, size: put.size, sha256: put.sha256, key };
  }));
  const failed = settled.find((r): r is PromiseRejectedResult => r.status === "rejected");
  if (failed) {
    await removeArtifacts(c.store, job.id);
    throw failed.reason;
  }
  return settled.map((r) => (r as PromiseFulfilledResult<StoredArtifact>).value);
}

async function storeAndCommit(c: RunContext, job: JobRow, output: HandlerOutput) {
  // the network GeoJSON is read while the artifacts are stored
  const stored = storeArtifacts(c, job, output);
  stored.catch(() => undefined); // awaited below; a failed read must not leave it unobserved
  // the stream links also go to PostGIS for the feature service (/api/v1/ogc), with the result
  const lines = output.artifacts.find((a) => a.name === "streams.geojson" || a.name === "network.geojson");
  let linesGeoJson: unknown;
  try {
    linesGeoJson = lines ? JSON.parse(await readFile(lines.path, "utf8")) : null;
  } catch (e) {
    // the puts still run: let them end, then leave nothing of this attempt
    if (await stored.then(() => true, () => false)) await removeArtifacts(c.store, job.id);
    throw e;
  }
  const artifacts = await stored;
  const tCommit = performance.now();
  const done = await c.db.transaction(async (tx) => {
    const now = new Date();
    const [row] = await tx.update(jobs).set({ status: "succeeded", stage: "done", progress: 1, finishedAt: now, updatedAt: now, heartbeatAt: now })
      .where(and(eq(jobs.id, job.id), eq(jobs.workerId, c.workerId), eq(jobs.status, "running"), isNull(jobs.cancelRequestedAt)))
      .returning();
    if (!row) return false;
    const result = { summary: output.summary, timingsS: output.timingsS, artifacts, softwareVersion: SOFTWARE.version };
    await tx.insert(jobResults).values({ jobId: job.id, ...result }).onConflictDoUpdate({ target: jobResults.jobId, set: result });
    if (linesGeoJson !== null) await storeNetworkFeatures(tx, job.id, linesGeoJson);
    // in the same transaction: whoever sees the job succeeded also finds its success audited, exactly once
    await appendAudit(tx, { orgId: job.orgId, action: "job.succeeded", actor: WORKER_ACTOR, target: `job:${job.id}`, details: { kind: job.kind, artifacts: artifacts.length } }, systemClock);
    return true;
  });
  return { done, artifacts, tCommit };
}

export async function runJob(c: RunContext, jobId: string): Promise<RunOutcome> {
  const t0 = performance.now();
  const claimed = await claim(c, jobId);
  if ("outcome" in claimed) return claimed.outcome;
  const { job } = claimed;
  const outDir = await mkdtemp(path.join(tmpdir(), `rillscale-job-${job.id}-`));
  try {
    const [dataset] = await c.db.select().from(datasets).where(eq(datasets.id, job.datasetId!));
    const input: HandlerInput = {
      datasetPath: await datasetFile(c.store, dataset.storageKey, outDir), format: dataset.format, params: job.params, outDir,
    };
    const tThread = performance.now();
    const ended = await runThread(c, job, input);
    const tStore = performance.now();
    if (ended.kind === "stopped") {
      await removeArtifacts(c.store, job.id);
      if (ended.why === "lost") return "lost";
      await finish(c, job, "cancelled", null);
      return "cancelled";
    }
    if (ended.kind === "error") {
      console.error(`[worker] job ${job.id} (${job.kind}) failed: ${ended.error.name} ${ended.error.code ?? ""} ${ended.error.message}`);
      await finish(c, job, "failed", failureProblem(job.id, ended.error));
      return "failed";
    }
    const stopBeating = keepBeating(c, job);
    const { done, artifacts, tCommit } = await storeAndCommit(c, job, ended.output).finally(stopBeating);
    if (!done) {
      // cancelled (or taken over) while the artifacts were written: leave nothing of this attempt
      const [now] = await c.db.select().from(jobs).where(eq(jobs.id, job.id));
      if (now?.workerId === c.workerId) {
        await removeArtifacts(c.store, job.id);
        await finish(c, job, "cancelled", null);
        return "cancelled";
      }
      return "lost";
    }
    // where a job's time went beyond its pipeline, for the queue-overhead figure of the api bench
    const s = (a: number, b: number) => ((b - a) / 1000).toFixed(3);
    console.log(`[worker] job ${job.id} (${job.kind}) seconds: claim+input ${s(t0, tThread)}, thread ${s(tThread, tStore)}, artifacts ${s(tStore, tCommit)}, commit ${s(tCommit, performance.now())}`);
    return "succeeded";
  } catch (e) {
    // our own failure (database, storage): hand the job back so the retry pg-boss makes can claim it
    await c.db.update(jobs).set({ status: "queued", workerId: null, stage: null, updatedAt: new Date() })
      .where(and(eq(jobs.id, job.id), eq(jobs.workerId, c.workerId), eq(jobs.status, "running"))).catch(() => undefined);
    throw e;
  } finally {
    await rm(outDir, { recursive: true, force: true });
    prestartThread();
  }
}

/**
 * Heartbeats while the main thread stores the artifacts and commits the result (the analysis thread's beat has
 * stopped): large outputs or a slow S3 could otherwise outlast RILLSCALE_JOB_STALE_SECONDS, and the reaper would
 * hand a live job back to the queue.
 */
export function keepBeating(c: RunContext, job: Pick<JobRow, "id">): () => Promise<void> {
  let inFlight: Promise<unknown> = Promise.resolve();
  const beat = setInterval(() => {
    inFlight = c.db.update(jobs).set({ heartbeatAt: new Date() })
      .where(and(eq(jobs.id, job.id), eq(jobs.workerId, c.workerId), eq(jobs.status, "running")))
      .catch((e: Error) => console.error(`[worker] heartbeat of job ${job.id} while storing: ${e.message}`));
  }, HEARTBEAT_MS);
  // stopping waits for a beat already sent, so none lands after the row is finished
  return () => {
    clearInterval(beat);
    return inFlight.then(() => undefined);
  };
}

/** Running jobs whose worker stopped writing heartbeats (killed, machine lost): back to queued, to be re-sent. */
export async function reclaimStale(db: Db, staleSeconds: number): Promise<{ id: string; kind: string }[]> {
  const staleBefore = new Date(Date.now() - staleSeconds * 1000);
  return db.update(jobs).set({ status: "queued", workerId: null, updatedAt: new Date() })
    .where(and(eq(jobs.status, "running"), lt(jobs.heartbeatAt, staleBefore)))
    .returning({ id: jobs.id, kind: jobs.kind });
}
