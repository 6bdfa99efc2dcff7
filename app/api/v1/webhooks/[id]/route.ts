// GET/PATCH/DELETE /api/v1/webhooks/{id} — one endpoint: read, change (URL, events, re-enable), remove
import { json, noContent, parseJson, withAuth } from "@/lib/api/handler";
import { deleteEndpoint, endpointView, getEndpoint, updateEndpoint } from "@/lib/webhooks/endpoints";
import { allowPrivateTargets, auditWebhook, notFound, withUrlCheck } from "@/lib/webhooks/route-helpers";
import { WebhookParams, WebhookUpdateBody } from "@/lib/webhooks/schemas";
import { otherMethods } from "@/lib/api/fallbacks";

export const runtime = "nodejs";

const idOf = (params: unknown) => {
  const p = WebhookParams.safeParse(params);
  if (!p.success) throw notFound(String((params as { id?: string }).id));
  return p.data.id;
};

export const GET = withAuth(async ({ db, principal, params }) => {
  const e = await getEndpoint(db, principal.org.id, idOf(params));
  if (!e) throw notFound(idOf(params));
  return json(endpointView(e));
}, { permission: "keys:manage" });

export const PATCH = withAuth(async (c) => {
  const id = idOf(c.params);
  const body = await parseJson(c.req, WebhookUpdateBody);
  const e = await withUrlCheck(() => updateEndpoint(c.db, c.principal.org.id, id, body, allowPrivateTargets()));
  if (!e) throw notFound(id);
  await auditWebhook(c, "webhook.update", id, { fields: Object.keys(body) });
  return json(endpointView(e));
}, { permission: "keys:manage" });

export const DELETE = withAuth(async (c) => {
  const id = idOf(c.params);
  if (!(await deleteEndpoint(c.db, c.principal.org.id, id))) throw notFound(id);
  await auditWebhook(c, "webhook.delete", id);
  return noContent();
}, { permission: "keys:manage" });

export const { POST, PUT, OPTIONS } = otherMethods("GET", "PATCH", "DELETE");
