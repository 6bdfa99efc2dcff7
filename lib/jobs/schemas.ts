// Request and response bodies of the dataset, job and result routes (zod, with OpenAPI metadata): the handlers
// parse with them and openapi/registry.ts documents them. Job parameters are each kind's pipeline schema.
import { z } from "@/lib/api/schemas";
import { JOB_KINDS } from "@/lib/jobs/kinds";

const IsoDate = z.iso.datetime({ offset: true }).openapi({ example: "2026-12-01T12:00:00.000Z" });
const Uuid = z.uuid();
const PAGE_MAX = 200;

export const DatasetFormatSchema = z.enum(["geotiff", "geojson", "zip"]).openapi("DatasetFormat");
export const JobKindSchema = z.enum(JOB_KINDS).openapi("JobKind");
export const JobStatusSchema = z.enum(["queued", "running", "succeeded", "failed", "cancelled"]).openapi("JobStatus");

const Actor = z.object({ kind: z.string(), id: z.string().nullable(), label: z.string() });

export const Dataset = z.object({
  id: Uuid,
  name: z.string(),
  format: DatasetFormatSchema,
  mediaType: z.string(),
  sha256: z.string().openapi({ description: "SHA-256 of the uploaded bytes, lowercase hex." }),
  sizeBytes: z.number().int(),
  metadata: z.record(z.string(), z.unknown()).openapi({
    description: "Read before the upload was accepted. Rasters: crs {epsg, name, geographic}, bboxLonLat [west, south, east, north] in degrees, width, height, bands, cellSizeM [x, y] in metres, dataType, nodata (number, \"NaN\" or null), compression, tiled. Lines: crs, bboxLonLat, featureCount, lineCount, vertexCount, skipped. epsgGiven: the EPSG code sent with the upload, if any.",
  }),
  createdBy: Actor,
  createdAt: IsoDate,
}).openapi("Dataset");
export const DatasetList = z.object({ items: z.array(Dataset), nextCursor: z.string().nullable() }).openapi("DatasetList");

export const DatasetUploadQuery = z.object({
  filename: z.string().min(1).max(200).optional().openapi({ description: "File name (for a raw body; a multipart part carries its own)." }),
  epsg: z.coerce.number().int().min(1024).max(999_999).optional().openapi({ description: "EPSG code of the file's CRS, when it states none or states it wrongly; passed on to jobs." }),
});

const listBase = {
  limit: z.coerce.number().int().min(1).max(PAGE_MAX).default(50),
  cursor: z.string().max(200).optional().openapi({ description: "nextCursor of the previous page." }),
  createdFrom: IsoDate.optional(),
  createdTo: IsoDate.optional(),
};

export const DatasetListQuery = z.object({
  ...listBase,
  format: DatasetFormatSchema.optional(),
  name: z.string().max(200).optional().openapi({ description: "Part of the name, case-insensitive." }),
  sha256: z.string().regex(/^[0-9a-f]{64}$/).optional(),
});

export const IdParams = z.object({ id: Uuid.openapi({ param: { name: "id", in: "path" } }) });
export const ArtifactParams = z.object({
  id: Uuid.openapi({ param: { name: "id", in: "path" } }),
  name: z.string().regex(/^[A-Za-z0-9_-][A-Za-z0-9._-]{0,127}$/).openapi({ param: { name: "name", in: "path" } }),
});

export const JobCreateBody = z.object({
  dataset: Uuid.openapi({ description: "Id of the dataset to analyse." }),
  kind: JobKindSchema,
  params: z.record(z.string(), z.unknown()).default({}).openapi({
    description: `Parameters of the kind, checked by its schema (see ${JOB_KINDS.map((k) => `${k[0].toUpperCase()}${k.slice(1)}Params`).join(", ")}); omitted ones take their defaults.`,
  }),
}).openapi("JobCreateBody");

const Problem = z.record(z.string(), z.unknown()).openapi({ description: "The failure as an RFC 9457 problem document." });

export const Job = z.object({
  id: Uuid,
  kind: JobKindSchema,
  dataset: Uuid.nullable().openapi({ description: "null once the dataset was deleted." }),
  params: z.record(z.string(), z.unknown()).openapi({ description: "The parameters with their defaults filled in." }),
  status: JobStatusSchema,
  stage: z.string().nullable(),
  progress: z.number().min(0).max(1),
  attempts: z.number().int(),
  cancelRequested: z.boolean(),
  cachedFrom: Uuid.nullable().openapi({ description: "When set, the result was reused from this earlier job (same dataset bytes, kind, parameters and software version)." }),
  error: Problem.nullable(),
  submittedBy: Actor,
  createdAt: IsoDate,
  startedAt: IsoDate.nullable(),
  finishedAt: IsoDate.nullable(),
  updatedAt: IsoDate,
  durationS: z.number().nullable(),
  links: z.object({ self: z.string(), result: z.string(), artifacts: z.string(), cancel: z.string() }),
}).openapi("Job");
export const JobList = z.object({ items: z.array(Job), nextCursor: z.string().nullable() }).openapi("JobList");

export const JobListQuery = z.object({
  ...listBase,
  status: z.string().regex(/^(queued|running|succeeded|failed|cancelled)(,(queued|running|succeeded|failed|cancelled))*$/).optional()
    .openapi({ description: "One status or several, comma-separated." }),
  kind: JobKindSchema.optional(),
  dataset: Uuid.optional(),
});

export const Artifact = z.object({
  name: z.string(),
  mediaType: z.string(),
  sizeBytes: z.number().int(),
  sha256: z.string(),
  href: z.string(),
}).openapi("Artifact");
export const ArtifactList = z.object({ items: z.array(Artifact) }).openapi("ArtifactList");

export const JobResult = z.object({
  job: Uuid,
  kind: JobKindSchema,
  cachedFrom: Uuid.nullable(),
  software: z.object({ name: z.string(), version: z.string() }),
  summary: z.record(z.string(), z.unknown()).openapi({ description: "The pipeline's summary: units in the key suffixes (M, M2, Km, Km2, PerKm) or stated beside each estimator, fit evidence (points, range, R², SE, CI)." }),
  timingsS: z.record(z.string(), z.number()).openapi({ description: "Seconds per stage of the run that produced the result." }),
}).openapi("JobResult");
