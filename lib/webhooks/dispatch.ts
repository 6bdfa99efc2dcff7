// The worker side of webhooks: queue one delivery per subscribed endpoint when a job ends, then send due
// deliveries — claimed with FOR UPDATE SKIP LOCKED and leased, so several workers never send one attempt twice
// — recording each attempt, retrying with backoff and jitter, and disabling an endpoint that answers 410.
import { randomUUID } from "node:crypto";
import { and, arrayContains, eq, lte, sql } from "drizzle-orm";
import type { Db } from "@/db/client";
import { webhookAttempts, webhookDeliveries, webhookEndpoints } from "@/db/schema";
import { signingSecrets } from "@/lib/webhooks/endpoints";
import { eventOfStatus, jobEventPayload, type JobEventFacts } from "@/lib/webhooks/events";
import { nextDelayMs, verdictOf, type RetryPolicy } from "@/lib/webhooks/retry-schedule";
import { ATTEMPT_TIMEOUT_MS, sendAttempt } from "@/lib/webhooks/send-attempt";
import { webhookHeaders } from "@/lib/webhooks/signature";

/** A claimed delivery is invisible to other workers this long: past one attempt's deadline, with margin. */
const LEASE_MS = ATTEMPT_TIMEOUT_MS * 2;
const BATCH = 10;

export interface DispatchSettings {
  serverSecret: string;
  allowPrivate: boolean;
  policy: RetryPolicy;
}

/** One pending delivery per enabled endpoint of the org that subscribed to the event; returns how many. */
export async function enqueueJobEvent(db: Db, orgId: string, job: JobEventFacts, now = new Date()): Promise<number> {
  const event = eventOfStatus(job.status);
  const targets = await db.select({ id: webhookEndpoints.id }).from(webhookEndpoints)
    .where(and(eq(webhookEndpoints.orgId, orgId), eq(webhookEndpoints.enabled, true), arrayContains(webhookEndpoints.events, [event])));
  if (targets.length === 0) return 0;
  const payload = jobEventPayload(job);
  await db.insert(webhookDeliveries).values(targets.map((t) => ({
    id: `msg_${randomUUID()}`, endpointId: t.id, orgId, event, jobId: job.id, payload, nextAttemptAt: now,
  })));
  return targets.length;
}

async function claimDue(db: Db, now: Date) {
  return db.transaction(async (tx) => {
    const due = await tx.select({ id: webhookDeliveries.id }).from(webhookDeliveries)
      .where(and(eq(webhookDeliveries.state, "pending"), lte(webhookDeliveries.nextAttemptAt, now)))
      .orderBy(webhookDeliveries.nextAttemptAt).limit(BATCH).for("update", { skipLocked: true });
    if (due.length === 0) return [];
    const ids = due.map((d) => d.id);
    return tx.update(webhookDeliveries).set({ nextAttemptAt: new Date(now.getTime() + LEASE_MS), attempts: sql`${webhookDeliveries.attempts} + 1` })
      .where(sql`${webhookDeliveries.id} IN (${sql.join(ids.map((id) => sql`${id}`), sql`, `)})`).returning();
  });
}

/** Sends every delivery due now (one attempt each); returns how many attempts were made. */
export async function deliverDue(db: Db, s: DispatchSettings, now = new Date()): Promise<number> {
  const claimed = await claimDue(db, now);
  await Promise.all(claimed.map(async (d) => {
    const [endpoint] = await db.select().from(webhookEndpoints).where(eq(webhookEndpoints.id, d.endpointId));
    if (!endpoint || !endpoint.enabled) {
      await db.update(webhookDeliveries).set({ state: "failed", nextAttemptAt: null, lastError: "the endpoint is disabled" }).where(eq(webhookDeliveries.id, d.id));
      return;
    }
    const at = new Date();
    const headers = webhookHeaders(signingSecrets(endpoint, s.serverSecret, at), d.id, Math.floor(at.getTime() / 1000), d.payload);
    const r = await sendAttempt({ url: endpoint.url, headers, body: d.payload, allowPrivate: s.allowPrivate });
    await db.insert(webhookAttempts).values({ deliveryId: d.id, attempt: d.attempts, at, status: r.status, durationMs: r.durationMs, error: r.error, responseExcerpt: r.responseExcerpt });
    const verdict = verdictOf(r.status);
    const base = { lastStatus: r.status, lastError: r.error };
    if (verdict === "delivered") {
      await db.update(webhookDeliveries).set({ ...base, state: "delivered", deliveredAt: new Date(), nextAttemptAt: null }).where(eq(webhookDeliveries.id, d.id));
    } else if (verdict === "disable") {
      await db.transaction(async (tx) => {
        await tx.update(webhookEndpoints).set({ enabled: false, disabledReason: `the receiver answered 410 Gone at ${at.toISOString()}`, updatedAt: new Date() }).where(eq(webhookEndpoints.id, endpoint.id));
        await tx.update(webhookDeliveries).set({ ...base, state: "failed", nextAttemptAt: null }).where(eq(webhookDeliveries.id, d.id));
      });
    } else {
      const wait = nextDelayMs(d.attempts, s.policy);
      await db.update(webhookDeliveries).set(wait === null
        ? { ...base, state: "failed", nextAttemptAt: null }
        : { ...base, nextAttemptAt: new Date(Date.now() + wait) }).where(eq(webhookDeliveries.id, d.id));
    }
  }));
  return claimed.length;
}
