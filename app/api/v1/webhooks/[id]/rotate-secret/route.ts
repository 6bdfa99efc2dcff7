// POST /api/v1/webhooks/{id}/rotate-secret — a new signing secret (shown once); the old one signs beside it for the overlap
import { json, parseJson, withAuth } from "@/lib/api/handler";
import { env } from "@/lib/env";
import { endpointView, rotateEndpointSecret } from "@/lib/webhooks/endpoints";
import { auditWebhook, notFound } from "@/lib/webhooks/route-helpers";
import { WebhookParams, WebhookRotateBody } from "@/lib/webhooks/schemas";
import { otherMethods } from "@/lib/api/fallbacks";

export const runtime = "nodejs";

export const POST = withAuth(async (c) => {
  const p = WebhookParams.safeParse(c.params);
  if (!p.success) throw notFound(String(c.params.id));
  const body = await parseJson(c.req, WebhookRotateBody);
  const r = await rotateEndpointSecret(c.db, env().RILLSCALE_KEY_PEPPER, c.principal.org.id, p.data.id, body.overlapHours, c.clock.now());
  if (!r) throw notFound(p.data.id);
  await auditWebhook(c, "webhook.rotate-secret", p.data.id, { overlapHours: body.overlapHours });
  return json({ endpoint: endpointView(r.endpoint), secret: r.secret });
}, { permission: "keys:manage" });

export const { GET, PUT, PATCH, DELETE, OPTIONS } = otherMethods("POST");
