// Rows → the response bodies of lib/jobs/schemas.ts (dates as ISO strings, storage keys never leave).
import type { DatasetRow, JobResultRow, JobRow } from "@/db/schema";
import type { z } from "@/lib/api/schemas";
import type { Artifact, Dataset, Job } from "@/lib/jobs/schemas";
import type { JobKind } from "@/lib/jobs/kinds";

const iso = (d: Date | null) => (d ? d.toISOString() : null);

export const datasetView = (d: DatasetRow): z.infer<typeof Dataset> => ({
  id: d.id, name: d.name, format: d.format, mediaType: d.mediaType, sha256: d.sha256, sizeBytes: d.sizeBytes,
  metadata: d.metadata, createdBy: d.createdBy, createdAt: d.createdAt.toISOString(),
});

export const jobPath = (id: string) => `/api/v1/jobs/${id}`;

export const jobView = (j: JobRow): z.infer<typeof Job> => ({
  id: j.id,
  kind: j.kind as JobKind,
  dataset: j.datasetId,
  params: j.params,
  status: j.status,
  stage: j.stage,
  progress: j.progress,
  attempts: j.attempts,
  cancelRequested: j.cancelRequestedAt !== null,
  cachedFrom: j.cachedFromJobId,
  error: j.error,
  submittedBy: j.submittedBy,
  createdAt: j.createdAt.toISOString(),
  startedAt: iso(j.startedAt),
  finishedAt: iso(j.finishedAt),
  updatedAt: j.updatedAt.toISOString(),
  durationS: j.startedAt && j.finishedAt ? (j.finishedAt.getTime() - j.startedAt.getTime()) / 1000 : null,
  links: { self: jobPath(j.id), result: `${jobPath(j.id)}/result`, artifacts: `${jobPath(j.id)}/artifacts`, cancel: `${jobPath(j.id)}/cancel` },
});

export const artifactViews = (jobId: string, r: JobResultRow): z.infer<typeof Artifact>[] =>
  r.artifacts.map((a) => ({ name: a.name, mediaType: a.mediaType, sizeBytes: a.size, sha256: a.sha256, href: `${jobPath(jobId)}/artifacts/${a.name}` }));
