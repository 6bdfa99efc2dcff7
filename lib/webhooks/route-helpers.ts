// What the webhook routes share: the settings they need and the audit entry every change writes.
import "server-only";
import { actingOf, type AuthedContext } from "@/lib/api/handler";
import { ApiError } from "@/lib/api/problem";
import { appendAudit } from "@/lib/audit/log";
import { followUpEnv } from "@/lib/provenance/config";
import { BlockedAddressError } from "@/lib/webhooks/address-guard";

export const allowPrivateTargets = () => followUpEnv().RILLSCALE_WEBHOOKS_ALLOW_PRIVATE;

export async function auditWebhook(c: AuthedContext<unknown>, action: string, endpointId: string, details: Record<string, unknown> = {}) {
  const acting = actingOf(c.principal, c.ip);
  await appendAudit(c.db, { orgId: acting.orgId, action, actor: acting.actor, target: `webhook:${endpointId}`, ip: c.ip, details }, c.clock);
}

/** A refused URL is the caller's mistake: 422 naming the field. */
export async function withUrlCheck<T>(f: () => Promise<T>): Promise<T> {
  try {
    return await f();
  } catch (e) {
    if (e instanceof BlockedAddressError || e instanceof RangeError) throw new ApiError("validation", e.message, { errors: [{ pointer: "/url", detail: e.message }] });
    throw e;
  }
}

export const notFound = (id: string) => new ApiError("not-found", `No webhook endpoint ${id}.`);
