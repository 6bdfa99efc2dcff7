// POST /api/v1/datasets — upload a DEM or stream lines (streamed, hashed, inspected before it is accepted);
// GET /api/v1/datasets — the organisation's datasets, newest first
import { actingOf, json, parseQuery } from "@/lib/api/handler";
import { listDatasets } from "@/lib/datasets/registry";
import { uploadDataset } from "@/lib/datasets/upload";
import { dataEnv, objectStore } from "@/lib/jobs/config";
import { withDataRoute } from "@/lib/jobs/route";
import { DatasetListQuery, DatasetUploadQuery } from "@/lib/jobs/schemas";
import { datasetView } from "@/lib/jobs/views";
import { otherMethods } from "@/lib/api/fallbacks";

export const runtime = "nodejs";
export const dynamic = "force-dynamic";

export const POST = withDataRoute(async ({ req, principal, db, clock, ip }) => {
  const q = parseQuery(req, DatasetUploadQuery);
  const e = dataEnv();
  const { dataset, created } = await uploadDataset(req, db, objectStore(), clock, actingOf(principal, ip), {
    maxBytes: e.RILLSCALE_UPLOAD_MAX_BYTES, tempDir: e.RILLSCALE_UPLOAD_TMP, filename: q.filename, epsg: q.epsg,
  });
  return json(datasetView(dataset), created ? 201 : 200, { location: `/api/v1/datasets/${dataset.id}` });
}, "datasets:write");

export const GET = withDataRoute(async ({ req, principal, db }) => {
  const q = parseQuery(req, DatasetListQuery);
  const page = await listDatasets(db, principal.org.id, {
    ...q, createdFrom: q.createdFrom ? new Date(q.createdFrom) : undefined, createdTo: q.createdTo ? new Date(q.createdTo) : undefined,
  });
  return json({ items: page.items.map(datasetView), nextCursor: page.nextCursor });
}, "jobs:read");

export const { PUT, PATCH, DELETE, OPTIONS } = otherMethods("GET", "POST");
