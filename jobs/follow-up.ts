// What happens after a job ends, on the worker side: a succeeded job gets its signed provenance, every
// finished job (succeeded, failed, cancelled — also cancels made in the API) queues its webhook deliveries,
// and due deliveries are sent. Driven by our jobs table (a job without a follow-up row), so no path that ends
// a job needs to call in here, and a crash between steps is picked up again on the next poll.
import { and, eq, inArray, isNull, sql } from "drizzle-orm";
import { db as appDb, type Db } from "@/db/client";
import { jobFollowUps, jobs } from "@/db/schema";
import { env } from "@/lib/env";
import { followUpEnv, gitCommit } from "@/lib/provenance/config";
import { rotateIfDue } from "@/lib/provenance/keys";
import { ProvenanceUnavailableError, recordProvenance } from "@/lib/provenance/records";
import { deliverDue, enqueueJobEvent, type DispatchSettings } from "@/lib/webhooks/dispatch";

const BATCH = 20;
/** The signing-key schedule is looked at hourly; rotation itself is rare (default every 90 days). */
const ROTATION_CHECK_MS = 3_600_000;
const FINAL = ["succeeded", "failed", "cancelled"] as const;

export async function followUpFinishedJobs(db: Db, serverSecret: string, commit: string | null, log: (m: string) => void): Promise<number> {
  const finished = await db.select({ id: jobs.id, orgId: jobs.orgId, status: jobs.status, kind: jobs.kind, datasetId: jobs.datasetId, finishedAt: jobs.finishedAt, updatedAt: jobs.updatedAt })
    .from(jobs).leftJoin(jobFollowUps, eq(jobFollowUps.jobId, jobs.id))
    .where(and(inArray(jobs.status, [...FINAL]), isNull(jobFollowUps.jobId)))
    .orderBy(sql`coalesce(${jobs.finishedAt}, ${jobs.updatedAt})`).limit(BATCH);
  for (const j of finished) {
    const status = j.status as (typeof FINAL)[number];
    if (status === "succeeded") {
      try {
        await recordProvenance(db, j.id, serverSecret, commit);
      } catch (e) {
        if (!(e instanceof ProvenanceUnavailableError)) throw e; // database trouble: try again on the next poll
        log(`job ${j.id}: no provenance (${e.message})`);
      }
    }
    const [claimed] = await db.insert(jobFollowUps).values({ jobId: j.id, status }).onConflictDoNothing().returning();
    if (!claimed) continue; // another worker followed it up
    try {
      const n = await enqueueJobEvent(db, j.orgId, { id: j.id, kind: j.kind, status, dataset: j.datasetId, finishedAt: j.finishedAt ?? j.updatedAt });
      if (n > 0) log(`job ${j.id} ${status}: ${n} webhook deliveries queued`);
    } catch (e) {
      await db.delete(jobFollowUps).where(eq(jobFollowUps.jobId, j.id)); // hand it back to the next poll
      throw e;
    }
  }
  return finished.length;
}

/** Starts the polling loops in the worker; the returned function stops them. */
export function startFollowUp(log: (m: string) => void): () => void {
  const s = followUpEnv();
  const db = appDb();
  const serverSecret = env().RILLSCALE_KEY_PEPPER;
  const commit = gitCommit();
  const dispatch: DispatchSettings = {
    serverSecret, allowPrivate: s.RILLSCALE_WEBHOOKS_ALLOW_PRIVATE,
    policy: { maxAttempts: s.RILLSCALE_WEBHOOKS_MAX_ATTEMPTS, baseDelayMs: s.RILLSCALE_WEBHOOKS_RETRY_BASE_MS, maxDelayMs: 3_600_000 },
  };
  let busy = false;
  const tick = async () => {
    if (busy) return;
    busy = true;
    try {
      await followUpFinishedJobs(db, serverSecret, commit, log);
      await deliverDue(db, dispatch);
    } catch (e) {
      console.error(`[worker] follow-up: ${(e as Error).message}`);
    } finally {
      busy = false;
    }
  };
  const rotate = async () => {
    try {
      const kid = await rotateIfDue(db, serverSecret, s.RILLSCALE_SIGNING_KEY_ROTATE_DAYS);
      if (kid) log(`provenance signing key ${kid} is now active (schedule)`);
    } catch (e) {
      console.error(`[worker] signing-key schedule: ${(e as Error).message}`);
    }
  };
  void rotate();
  const timers = [setInterval(() => void tick(), s.RILLSCALE_FOLLOW_UP_POLL_MS), setInterval(() => void rotate(), ROTATION_CHECK_MS)];
  return () => timers.forEach(clearInterval);
}
