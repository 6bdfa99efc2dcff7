// Webhook endpoints of an organisation (named queries): registration with a secret shown once, rotation that
// keeps the previous secret signing for an overlap, the delivery log, and redelivery of a message.
import { randomUUID } from "node:crypto";
import { and, desc, eq, lt } from "drizzle-orm";
import type { Db } from "@/db/client";
import { webhookAttempts, webhookDeliveries, webhookEndpoints, type WebhookDeliveryRow, type WebhookEndpointRow } from "@/db/schema";
import { open, seal } from "@/lib/provenance/sealed-box";
import { checkWebhookUrl } from "@/lib/webhooks/address-guard";
import type { WebhookEvent } from "@/lib/webhooks/events";
import { generateSecret } from "@/lib/webhooks/signature";

const DELIVERY_PAGE = 50;

export const endpointView = (e: WebhookEndpointRow) => ({
  id: e.id, url: e.url, description: e.description, events: e.events, enabled: e.enabled, disabledReason: e.disabledReason,
  previousSecretUntil: e.previousUntil?.toISOString() ?? null, createdAt: e.createdAt.toISOString(), updatedAt: e.updatedAt.toISOString(),
});

export const deliveryView = (d: WebhookDeliveryRow) => ({
  id: d.id, event: d.event, job: d.jobId, state: d.state, attempts: d.attempts, lastStatus: d.lastStatus, lastError: d.lastError,
  nextAttemptAt: d.nextAttemptAt?.toISOString() ?? null, createdAt: d.createdAt.toISOString(), deliveredAt: d.deliveredAt?.toISOString() ?? null,
});

export async function createEndpoint(db: Db, serverSecret: string, orgId: string, input: { url: string; events: WebhookEvent[]; description?: string }, allowPrivate: boolean) {
  checkWebhookUrl(input.url, allowPrivate);
  const secret = generateSecret();
  const [row] = await db.insert(webhookEndpoints).values({
    orgId, url: input.url, events: input.events, description: input.description ?? "", sealedSecret: seal(secret, serverSecret, "webhook-secret"),
  }).returning();
  return { endpoint: row, secret };
}

export async function listEndpoints(db: Db, orgId: string) {
  return db.select().from(webhookEndpoints).where(eq(webhookEndpoints.orgId, orgId)).orderBy(desc(webhookEndpoints.createdAt));
}

export async function getEndpoint(db: Db, orgId: string, id: string): Promise<WebhookEndpointRow | null> {
  const [row] = await db.select().from(webhookEndpoints).where(and(eq(webhookEndpoints.id, id), eq(webhookEndpoints.orgId, orgId)));
  return row ?? null;
}

export async function updateEndpoint(db: Db, orgId: string, id: string, patch: { url?: string; events?: WebhookEvent[]; description?: string; enabled?: boolean }, allowPrivate: boolean) {
  if (patch.url !== undefined) checkWebhookUrl(patch.url, allowPrivate);
  const [row] = await db.update(webhookEndpoints).set({
    ...patch, updatedAt: new Date(), ...(patch.enabled === true ? { disabledReason: null } : patch.enabled === false ? { disabledReason: "disabled by an admin" } : {}),
  }).where(and(eq(webhookEndpoints.id, id), eq(webhookEndpoints.orgId, orgId))).returning();
  return row ?? null;
}

export async function deleteEndpoint(db: Db, orgId: string, id: string): Promise<boolean> {
  return (await db.delete(webhookEndpoints).where(and(eq(webhookEndpoints.id, id), eq(webhookEndpoints.orgId, orgId))).returning()).length > 0;
}

/** A new secret (returned once); the old one keeps signing beside it until `overlapHours` from now. */
export async function rotateEndpointSecret(db: Db, serverSecret: string, orgId: string, id: string, overlapHours: number, now = new Date()) {
  const current = await getEndpoint(db, orgId, id);
  if (!current) return null;
  const secret = generateSecret();
  const [row] = await db.update(webhookEndpoints).set({
    sealedSecret: seal(secret, serverSecret, "webhook-secret"),
    sealedPreviousSecret: overlapHours > 0 ? current.sealedSecret : null,
    previousUntil: overlapHours > 0 ? new Date(now.getTime() + overlapHours * 3_600_000) : null,
    updatedAt: now,
  }).where(eq(webhookEndpoints.id, id)).returning();
  return { endpoint: row, secret };
}

/** The secrets to sign with now: the current one first, then the previous one while its overlap lasts. */
export function signingSecrets(e: WebhookEndpointRow, serverSecret: string, now = new Date()): string[] {
  const out = [open(e.sealedSecret, serverSecret, "webhook-secret")];
  if (e.sealedPreviousSecret && e.previousUntil && e.previousUntil > now) out.push(open(e.sealedPreviousSecret, serverSecret, "webhook-secret"));
  return out;
}

/** Newest first; the cursor is the createdAt (ISO) of the last row of the previous page. */
export async function listDeliveries(db: Db, endpointId: string, cursor?: string) {
  const rows = await db.select().from(webhookDeliveries)
    .where(cursor ? and(eq(webhookDeliveries.endpointId, endpointId), lt(webhookDeliveries.createdAt, new Date(cursor))) : eq(webhookDeliveries.endpointId, endpointId))
    .orderBy(desc(webhookDeliveries.createdAt)).limit(DELIVERY_PAGE + 1);
  const page = rows.slice(0, DELIVERY_PAGE);
  return { items: page, nextCursor: rows.length > DELIVERY_PAGE ? page[page.length - 1].createdAt.toISOString() : null };
}

export async function attemptsOf(db: Db, deliveryId: string) {
  return db.select().from(webhookAttempts).where(eq(webhookAttempts.deliveryId, deliveryId)).orderBy(webhookAttempts.attempt);
}

export async function getDelivery(db: Db, endpointId: string, deliveryId: string) {
  const [row] = await db.select().from(webhookDeliveries).where(and(eq(webhookDeliveries.id, deliveryId), eq(webhookDeliveries.endpointId, endpointId)));
  return row ?? null;
}

/** Sends the same message again as a new delivery (a new webhook-id: receivers deduplicate by id, and this one is wanted). */
export async function redeliver(db: Db, original: WebhookDeliveryRow, now = new Date()) {
  const [row] = await db.insert(webhookDeliveries).values({
    id: `msg_${randomUUID()}`, endpointId: original.endpointId, orgId: original.orgId, event: original.event, jobId: original.jobId,
    payload: original.payload, nextAttemptAt: now,
  }).returning();
  return row;
}
