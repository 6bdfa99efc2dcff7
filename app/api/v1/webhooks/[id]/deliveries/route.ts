// GET /api/v1/webhooks/{id}/deliveries — the endpoint's delivery log, newest first
import { json, parseQuery, withAuth } from "@/lib/api/handler";
import { deliveryView, getEndpoint, listDeliveries } from "@/lib/webhooks/endpoints";
import { notFound } from "@/lib/webhooks/route-helpers";
import { DeliveryListQuery, WebhookParams } from "@/lib/webhooks/schemas";
import { otherMethods } from "@/lib/api/fallbacks";

export const runtime = "nodejs";

export const GET = withAuth(async ({ req, db, principal, params }) => {
  const p = WebhookParams.safeParse(params);
  if (!p.success || !(await getEndpoint(db, principal.org.id, p.data.id))) throw notFound(String(params.id));
  const page = await listDeliveries(db, p.data.id, parseQuery(req, DeliveryListQuery).cursor);
  return json({ items: page.items.map(deliveryView), nextCursor: page.nextCursor });
}, { permission: "keys:manage" });

export const { POST, PUT, PATCH, DELETE, OPTIONS } = otherMethods("GET");
