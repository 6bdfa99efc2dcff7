// Wires the analysis queues into the worker: one pg-boss work loop per kind, and a reaper that hands jobs of
// dead workers (no heartbeat for RILLSCALE_JOB_STALE_SECONDS) back to their queue.
import { randomUUID } from "node:crypto";
import { hostname } from "node:os";
import type PgBoss from "pg-boss";
import { db } from "@/db/client";
import { reclaimStale, runJob, type RunContext } from "@/jobs/handlers/run-job";
import { systemClock } from "@/lib/auth/clock";
import { dataEnv, objectStore } from "@/lib/jobs/config";
import { purgeExpiredIdempotencyKeys } from "@/lib/jobs/idempotency";
import { purgeEndedWindows } from "@/lib/jobs/rate-limit";
import { JOB_KINDS, isJobKind, queueOf } from "@/lib/jobs/kinds";

/** A job of an org at its running limit is sent again after this long. */
const DEFER_SECONDS = 2;
/** Idle queues are polled this often (pg-boss's default is 2 s): queue overhead stays well under a second. */
const POLL_SECONDS = 0.5;
/** Expired idempotency records and ended rate-limit windows are deleted this often. */
const PURGE_MS = 3_600_000;

export interface AnalysisJobData {
  jobId: string;
}

export async function workAnalysisQueues(boss: PgBoss, log: (msg: string) => void): Promise<void> {
  const e = dataEnv();
  const ctx: RunContext = {
    db: db(), store: objectStore(), workerId: `${hostname()}:${process.pid}:${randomUUID().slice(0, 8)}`,
    staleSeconds: e.RILLSCALE_JOB_STALE_SECONDS, orgMaxRunning: e.RILLSCALE_ORG_MAX_RUNNING_JOBS,
  };
  for (const kind of JOB_KINDS) {
    await boss.work<AnalysisJobData>(queueOf(kind), { pollingIntervalSeconds: POLL_SECONDS }, async ([job]) => {
      const outcome = await runJob(ctx, job.data.jobId);
      if (outcome === "deferred") await boss.send(queueOf(kind), job.data, { startAfter: DEFER_SECONDS });
      log(`${kind} job ${job.data.jobId}: ${outcome}`);
    });
  }
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
}
