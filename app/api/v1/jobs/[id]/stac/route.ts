// GET /api/v1/jobs/{id}/stac — the STAC 1.1.0 Item of a succeeded job (artifacts as assets, provenance linked)
import { eq } from "drizzle-orm";
import { datasets } from "@/db/schema";
import { json, withAuth } from "@/lib/api/handler";
import { ApiError } from "@/lib/api/problem";
import { buildStacItem } from "@/lib/catalog/stac-item";
import { env } from "@/lib/env";
import { idParamOf } from "@/lib/jobs/params";
import { SOFTWARE } from "@/lib/jobs/software";
import { getResult } from "@/lib/jobs/submit";
import { otherMethods } from "@/lib/api/fallbacks";

export const runtime = "nodejs";

export const GET = withAuth(async ({ params, principal, db }) => {
  const { job, result } = await getResult(db, principal.org.id, idParamOf(params, "job"));
  const [dataset] = job.datasetId ? await db.select().from(datasets).where(eq(datasets.id, job.datasetId)) : [];
  const bbox = dataset?.metadata.bboxLonLat as [number, number, number, number] | undefined;
  if (!dataset || !bbox) throw new ApiError("conflict", "The job's dataset (and so its footprint) is no longer known.");
  const epsg = (dataset.metadata.crs as { epsg?: number | null } | undefined)?.epsg ?? null;
  const item = buildStacItem({
    baseUrl: env().RILLSCALE_PUBLIC_URL,
    job: { id: job.id, kind: job.kind, createdAt: job.createdAt, finishedAt: job.finishedAt ?? job.updatedAt, cachedFrom: job.cachedFromJobId },
    dataset: { id: dataset.id, name: dataset.name }, bboxLonLat: bbox, epsg,
    software: { name: SOFTWARE.name, version: result.softwareVersion },
    artifacts: result.artifacts.map((a) => ({ name: a.name, mediaType: a.mediaType, sizeBytes: a.size, sha256: a.sha256 })),
  });
  return json(item, 200, { "content-type": "application/geo+json" });
}, { permission: "results:read" });

export const { POST, PUT, PATCH, DELETE, OPTIONS } = otherMethods("GET");
