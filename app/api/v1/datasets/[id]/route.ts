// GET /api/v1/datasets/{id} — one dataset and its metadata; DELETE — remove it (409 while a job uses it)
import { actingOf, json, noContent } from "@/lib/api/handler";
import { deleteDataset, getDataset } from "@/lib/datasets/registry";
import { objectStore } from "@/lib/jobs/config";
import { withDataRoute } from "@/lib/jobs/route";
import { idParamOf } from "@/lib/jobs/params";
import { datasetView } from "@/lib/jobs/views";
import { otherMethods } from "@/lib/api/fallbacks";

export const runtime = "nodejs";

export const GET = withDataRoute(async ({ params, principal, db }) => json(datasetView(await getDataset(db, principal.org.id, idParamOf(params, "dataset")))), "jobs:read");

export const DELETE = withDataRoute(async ({ params, principal, db, clock, ip }) => {
  await deleteDataset(db, objectStore(), clock, actingOf(principal, ip), idParamOf(params, "dataset"));
  return noContent();
}, "datasets:write");

export const { POST, PUT, PATCH, OPTIONS } = otherMethods("GET", "DELETE");
