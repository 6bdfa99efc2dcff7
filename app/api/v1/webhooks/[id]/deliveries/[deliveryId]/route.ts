// GET /api/v1/webhooks/{id}/deliveries/{deliveryId} — one delivery with every attempt's status code and timing
import { json, withAuth } from "@/lib/api/handler";
import { ApiError } from "@/lib/api/problem";
import { attemptsOf, deliveryView, getDelivery, getEndpoint } from "@/lib/webhooks/endpoints";
import { DeliveryParams } from "@/lib/webhooks/schemas";
import { otherMethods } from "@/lib/api/fallbacks";

export const runtime = "nodejs";

export const GET = withAuth(async ({ db, principal, params }) => {
  const p = DeliveryParams.safeParse(params);
  const d = p.success && (await getEndpoint(db, principal.org.id, p.data.id)) ? await getDelivery(db, p.data.id, p.data.deliveryId) : null;
  if (!d) throw new ApiError("not-found", "No such delivery.");
  const attemptLog = (await attemptsOf(db, d.id)).map((a) => ({
    attempt: a.attempt, at: a.at.toISOString(), status: a.status, durationMs: a.durationMs, error: a.error, responseExcerpt: a.responseExcerpt,
  }));
  return json({ ...deliveryView(d), attemptLog });
}, { permission: "keys:manage" });

export const { POST, PUT, PATCH, DELETE, OPTIONS } = otherMethods("GET");
