// GET /api/v1/webhooks — the organisation's endpoints; POST /api/v1/webhooks — register one (secret shown once)
import { json, parseJson, withAuth } from "@/lib/api/handler";
import { env } from "@/lib/env";
import { createEndpoint, endpointView, listEndpoints } from "@/lib/webhooks/endpoints";
import { allowPrivateTargets, auditWebhook, withUrlCheck } from "@/lib/webhooks/route-helpers";
import { WebhookCreateBody } from "@/lib/webhooks/schemas";
import { otherMethods } from "@/lib/api/fallbacks";

export const runtime = "nodejs";

export const GET = withAuth(async ({ db, principal }) => json({ items: (await listEndpoints(db, principal.org.id)).map(endpointView) }), { permission: "keys:manage" });

export const POST = withAuth(async (c) => {
  const body = await parseJson(c.req, WebhookCreateBody);
  const { endpoint, secret } = await withUrlCheck(() => createEndpoint(c.db, env().RILLSCALE_KEY_PEPPER, c.principal.org.id, body, allowPrivateTargets()));
  await auditWebhook(c, "webhook.create", endpoint.id, { url: endpoint.url, events: endpoint.events });
  return json({ endpoint: endpointView(endpoint), secret }, 201, { location: `/api/v1/webhooks/${endpoint.id}` });
}, { permission: "keys:manage" });

export const { PUT, PATCH, DELETE, OPTIONS } = otherMethods("GET", "POST");
