// Wires the analysis queues into the worker: one pg-boss work loop per kind, and a reaper that hands jobs of
// dead workers (no heartbeat for RILLSCALE_JOB_STALE_SECONDS) back to their queue.
import { randomUUID } from "node:crypto";
import { hostname } from "node:os";
import type PgBoss from "pg-boss";
import pg from "pg";
import { db } from "@/db/client";
import { prestartThread, reclaimStale, runJob, type RunContext } from "@/jobs/handlers/run-job";
import { systemClock } from "@/lib/auth/clock";
import { env } from "@/lib/env";
import { dataEnv, objectStore } from "@/lib/jobs/config";
import { purgeExpiredIdempotencyKeys } from "@/lib/jobs/idempotency";
import { purgeEndedWindows } from "@/lib/jobs/rate-limit";
import { JOB_KINDS, JOB_QUEUED_CHANNEL, isJobKind, queueOf, type JobKind } from "@/lib/jobs/kinds";

/** A job of an org at its running limit is sent again after this long. */
const DEFER_SECONDS = 2;
/** Idle queues are polled this often (pg-boss's default is 2 s): queue overhead stays well under a second. */
const POLL_SECONDS = 0.5;
/** A lost LISTEN connection is opened again after this long, doubled per failed try up to the cap (the polls go on
 *  meanwhile, so a down database is not hammered and nothing waits on it). */
const RELISTEN_MS = 1_000;
const RELISTEN_MAX_MS = 30_000;
/** Expired idempotency records and ended rate-limit windows are deleted this often. */
const PURGE_MS = 3_600_000;

export interface AnalysisJobData {
  jobId: string;
}

/** Starts the work loops; the returned stop() closes the LISTEN connection (the shutdown stops pg-boss itself). */
export async function workAnalysisQueues(boss: PgBoss, log: (msg: string) => void): Promise<{ stop(): Promise<void> }> {
  const e = dataEnv();
  const ctx: RunContext = {
    db: db(), store: objectStore(), workerId: `${hostname()}:${process.pid}:${randomUUID().slice(0, 8)}`,
    staleSeconds: e.RILLSCALE_JOB_STALE_SECONDS, orgMaxRunning: e.RILLSCALE_ORG_MAX_RUNNING_JOBS,
  };
  prestartThread();
  const workers = new Map<string, string>();
  for (const kind of JOB_KINDS) {
    workers.set(kind, await boss.work<AnalysisJobData>(queueOf(kind), { pollingIntervalSeconds: POLL_SECONDS }, async ([job]) => {
      const outcome = await runJob(ctx, job.data.jobId);
      if (outcome === "deferred") await boss.send(queueOf(kind), job.data, { startAfter: DEFER_SECONDS });
      log(`${kind} job ${job.data.jobId}: ${outcome}`);
    }));
  }
  const listening = await listenForSubmissions((kind) => {
    const id = workers.get(kind);
    if (id) boss.notifyWorker(id);
  });
  const reap = async () => {
    try {
      for (const j of await reclaimStale(ctx.db, ctx.staleSeconds)) {
        if (!isJobKind(j.kind)) continue;
        await boss.send(queueOf(j.kind), { jobId: j.id } satisfies AnalysisJobData);
        log(`job ${j.id}: its worker stopped answering; queued again`);
      }
    } catch (err) {
      console.error(`[worker] reclaiming stale jobs: ${(err as Error).message}`);
    }
  };
  const purge = async () => {
    try {
      const keys = await purgeExpiredIdempotencyKeys(ctx.db, systemClock);
      const windows = await purgeEndedWindows(ctx.db, systemClock);
      if (keys + windows > 0) log(`purged ${keys} idempotency records and ${windows} rate-limit counters`);
    } catch (err) {
      console.error(`[worker] purging request records: ${(err as Error).message}`);
    }
  };
  await reap();
  await purge();
  // the worker's shutdown ends the process, and these timers with it
  setInterval(() => void reap(), Math.max(1000, (ctx.staleSeconds * 1000) / 2));
  setInterval(() => void purge(), PURGE_MS);
  return { stop: listening.stop };
}

/** LISTEN on a connection of its own (outside the pool, so the pool's shutdown does not wait for it) for the
 *  submissions' NOTIFY (lib/jobs/submit.ts) and wake the kind's work loop; a lost connection is opened again. */
async function listenForSubmissions(wake: (kind: JobKind) => void): Promise<{ stop(): Promise<void> }> {
  let stopped = false;
  let current: pg.Client | null = null;
  let retry: NodeJS.Timeout | null = null;
  let delayMs = RELISTEN_MS;
  const again = (err: Error) => {
    if (stopped) return;
    console.error(`[worker] submission notifications: ${err.message}; listening again in ${delayMs / 1000} s`);
    retry = setTimeout(() => void listen(), delayMs);
    retry.unref();
    delayMs = Math.min(2 * delayMs, RELISTEN_MAX_MS);
  };
  const listen = async () => {
    if (stopped) return;
    const client = new pg.Client({ connectionString: env().DATABASE_URL, application_name: "rillscale-worker-listen" });
    current = client;
    let lost = false;
    const drop = (err: Error) => {
      if (lost) return;
      lost = true;
      void client.end().catch(() => undefined);
      again(err);
    };
    client.on("error", drop);
    client.on("end", () => drop(new Error("connection ended")));
    client.on("notification", (n) => {
      if (n.channel === JOB_QUEUED_CHANNEL && n.payload && isJobKind(n.payload)) wake(n.payload);
    });
    try {
      await client.connect();
      await client.query(`LISTEN ${JOB_QUEUED_CHANNEL}`);
      delayMs = RELISTEN_MS;
    } catch (e) {
      drop(e as Error);
    }
  };
  await listen();
  return {
    async stop() {
      stopped = true;
      if (retry) clearTimeout(retry);
      await current?.end().catch(() => undefined);
    },
  };
}
