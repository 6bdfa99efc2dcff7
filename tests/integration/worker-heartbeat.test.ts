// The worker's heartbeat while it stores a finished job's artifacts (jobs/handlers/run-job.ts keepBeating): the
// analysis thread's beat has stopped by then, and without this one a long store would look like a dead worker to
// the reaper (reclaimStale: running and heartbeat older than the stale window), which would hand a live job back
// to the queue. Real test database, rows of our own; the reaper itself is not run here, since it would take other
// tests' running jobs too.
import { randomUUID } from "node:crypto";
import { eq } from "drizzle-orm";
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { jobs, organisations } from "@/db/schema";
import { HEARTBEAT_MS, keepBeating, type RunContext } from "@/jobs/handlers/run-job";
import { appDb } from "@/tests/integration/client";

const { pool, db } = appDb();
const ours = randomUUID(), theirs = randomUUID();
const WORKER = "heartbeat-test-worker";
const STALE_S = 2; // a short stale window: a job missing two beats would be taken
const wouldBeReclaimed = (beat: Date) => beat.getTime() < Date.now() - STALE_S * 1000;
// Rows start with a heartbeat an hour ahead: no reaper of the shared stack (the SIGKILL test leaves one with a 2 s
// window running) can take them before the first beat, and any beat shows as a heartbeat moved back to now.
const ahead = () => new Date(Date.now() + 3600_000);
const sleep = (ms: number) => new Promise((r) => setTimeout(r, ms));
const heartbeatOf = async (id: string) => (await db.select().from(jobs).where(eq(jobs.id, id)))[0].heartbeatAt!;
const context = { db, workerId: WORKER } as unknown as RunContext;

beforeAll(async () => {
  const [org] = await db.select().from(organisations).where(eq(organisations.slug, "tallow-creek"));
  const row = (id: string, workerId: string) => ({
    id, orgId: org.id, kind: "drainage", params: {}, cacheKey: `heartbeat-${id}`, status: "running" as const, workerId,
    heartbeatAt: ahead(), startedAt: new Date(), submittedBy: { kind: "system" as const, id: null, label: "heartbeat test" },
  });
  await db.insert(jobs).values([row(ours, WORKER), row(theirs, "another-worker")]);
});

afterAll(async () => {
  await db.delete(jobs).where(eq(jobs.id, ours));
  await db.delete(jobs).where(eq(jobs.id, theirs));
  await pool.end();
});

describe("heartbeats while a finished job's artifacts are stored", () => {
  it("keep the job's row fresh past the stale window, so the reaper leaves it running (derived)", async () => {
    const stop = keepBeating(context, { id: ours });
    try {
      await sleep(STALE_S * 1000 + 2 * HEARTBEAT_MS);
      const beat = await heartbeatOf(ours);
      expect(Date.now() - beat.getTime()).toBeLessThan(2 * HEARTBEAT_MS + 500);
      expect(wouldBeReclaimed(beat)).toBe(false);
      // the job of another worker is not ours to touch: still its first heartbeat, an hour ahead
      expect((await heartbeatOf(theirs)).getTime()).toBeGreaterThan(Date.now() + 3000_000);
    } finally {
      await stop();
    }
  });

  it("stop when the store ends: no beat lands afterwards (derived)", async () => {
    const before = ahead();
    await db.update(jobs).set({ heartbeatAt: before }).where(eq(jobs.id, ours));
    const stop = keepBeating(context, { id: ours });
    await stop();
    await sleep(2 * HEARTBEAT_MS + 200);
    const beat = await heartbeatOf(ours);
    expect(beat.getTime()).toBe(before.getTime());
  });
});
