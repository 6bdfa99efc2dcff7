// POST /api/v1/webhooks/{id}/deliveries/{deliveryId}/redeliver — send the same message again (a new delivery)
import { json, withAuth } from "@/lib/api/handler";
import { ApiError } from "@/lib/api/problem";
import { deliveryView, getDelivery, getEndpoint, redeliver } from "@/lib/webhooks/endpoints";
import { auditWebhook } from "@/lib/webhooks/route-helpers";
import { DeliveryParams } from "@/lib/webhooks/schemas";
import { otherMethods } from "@/lib/api/fallbacks";

export const runtime = "nodejs";

export const POST = withAuth(async (c) => {
  const p = DeliveryParams.safeParse(c.params);
  const endpoint = p.success ? await getEndpoint(c.db, c.principal.org.id, p.data.id) : null;
  const original = endpoint && p.success ? await getDelivery(c.db, endpoint.id, p.data.deliveryId) : null;
  if (!endpoint || !original) throw new ApiError("not-found", "No such delivery.");
  if (!endpoint.enabled) throw new ApiError("conflict", "The endpoint is disabled; enable it (PATCH enabled: true) first.");
  const copy = await redeliver(c.db, original, c.clock.now());
  await auditWebhook(c, "webhook.redeliver", endpoint.id, { of: original.id, delivery: copy.id });
  return json(deliveryView(copy), 202);
}, { permission: "keys:manage" });

export const { GET, PUT, PATCH, DELETE, OPTIONS } = otherMethods("POST");
