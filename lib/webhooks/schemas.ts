// Request and response bodies of the webhook routes (zod with OpenAPI metadata): the handlers parse with them
// and openapi/provenance-operations.ts documents them.
import { z } from "@/lib/api/schemas";
import { WEBHOOK_EVENTS } from "@/lib/webhooks/events";

const IsoDate = z.iso.datetime({ offset: true });
const Events = z.array(z.enum(WEBHOOK_EVENTS)).min(1).max(WEBHOOK_EVENTS.length)
  .refine((e) => new Set(e).size === e.length, { message: "each event once" })
  .openapi({ description: `Events to receive: ${WEBHOOK_EVENTS.join(", ")}.` });

export const WebhookCreateBody = z.object({
  url: z.url().max(2000).openapi({ description: "Receiver URL (https in production; private, loopback and link-local addresses are refused)." }),
  events: Events,
  description: z.string().max(200).optional(),
}).openapi("WebhookCreateBody");

export const WebhookUpdateBody = z.object({
  url: z.url().max(2000).optional(),
  events: Events.optional(),
  description: z.string().max(200).optional(),
  enabled: z.boolean().optional().openapi({ description: "true re-enables an endpoint that was disabled (e.g. after a 410)." }),
}).openapi("WebhookUpdateBody");

export const WebhookRotateBody = z.object({
  overlapHours: z.number().min(0).max(168).default(24).openapi({ description: "Hours the previous secret keeps signing beside the new one (0 = stop at once)." }),
}).openapi("WebhookRotateBody");

export const WebhookEndpoint = z.object({
  id: z.uuid(), url: z.string(), description: z.string(), events: z.array(z.string()), enabled: z.boolean(),
  disabledReason: z.string().nullable(), previousSecretUntil: IsoDate.nullable(), createdAt: IsoDate, updatedAt: IsoDate,
}).openapi("WebhookEndpoint");
export const WebhookEndpointList = z.object({ items: z.array(WebhookEndpoint) }).openapi("WebhookEndpointList");
export const WebhookEndpointWithSecret = z.object({
  endpoint: WebhookEndpoint,
  secret: z.string().openapi({ description: "The signing secret (whsec_…), shown once. Verify deliveries with any Standard Webhooks library." }),
}).openapi("WebhookEndpointWithSecret");

export const WebhookAttempt = z.object({
  attempt: z.number().int(), at: IsoDate, status: z.number().int().nullable(), durationMs: z.number().int(), error: z.string().nullable(), responseExcerpt: z.string(),
}).openapi("WebhookAttempt");
export const WebhookDelivery = z.object({
  id: z.string().openapi({ description: "The webhook-id header of every attempt." }),
  event: z.string(), job: z.uuid().nullable(), state: z.enum(["pending", "delivered", "failed"]), attempts: z.number().int(),
  lastStatus: z.number().int().nullable(), lastError: z.string().nullable(), nextAttemptAt: IsoDate.nullable(), createdAt: IsoDate, deliveredAt: IsoDate.nullable(),
}).openapi("WebhookDelivery");
export const WebhookDeliveryList = z.object({ items: z.array(WebhookDelivery), nextCursor: z.string().nullable() }).openapi("WebhookDeliveryList");
export const WebhookDeliveryDetail = WebhookDelivery.extend({ attemptLog: z.array(WebhookAttempt) }).openapi("WebhookDeliveryDetail");
export const DeliveryListQuery = z.object({ cursor: IsoDate.optional() });

export const WebhookParams = z.object({ id: z.uuid().openapi({ param: { name: "id", in: "path" } }) });
export const DeliveryParams = z.object({
  id: z.uuid().openapi({ param: { name: "id", in: "path" } }),
  deliveryId: z.string().regex(/^msg_[0-9a-f-]{36}$/).openapi({ param: { name: "deliveryId", in: "path" } }),
});
