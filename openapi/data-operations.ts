// The dataset, job and result operations of the OpenAPI document. Kept apart from OPERATIONS (registry.ts)
// because their bodies are not all JSON: uploads are raw files or multipart, artifacts are files. Each job
// kind's parameters are registered from the pipeline's own zod schema (descriptions carry units, defaults, bounds).
import type { OpenAPIRegistry } from "@asteasolutions/zod-to-openapi";
import type { z } from "zod";
import { jsonContent as json, registerOperations, stringHeader, type DocumentedOperation } from "@/openapi/operations";
import { IDEMPOTENCY_DOC } from "@/lib/jobs/idempotency-key";
import { JOB_KINDS, KINDS } from "@/lib/jobs/kinds";
import { RATE_WINDOW_SECONDS } from "@/lib/jobs/config";
import * as J from "@/lib/jobs/schemas";
import { z as Z } from "@/lib/api/schemas";

const RATE_HEADERS = {
  "RateLimit-Policy": stringHeader(`Quotas per API key (or user) and per organisation, per ${RATE_WINDOW_SECONDS} s window (draft-ietf-httpapi-ratelimit-headers).`),
  RateLimit: stringHeader("Requests left (r) and seconds to the window's end (t) of the policy nearest its quota."),
};

const ERROR_TEXT: Record<number, string> = {
  400: "The request could not be read.", 401: "Not authenticated.", 403: "Not allowed (role or scope).", 404: "Not found (or another organisation's).",
  409: "Conflicts with the current state.", 413: "The upload is over the size limit (answered as soon as it is exceeded).",
  415: "Not an upload media type.", 416: "The range is outside the file.", 422: "Validation failed; `errors[]` names the fields.",
  429: "Too many requests; see Retry-After.",
};

const IdempotencyHeader = Z.object({ "Idempotency-Key": Z.string().optional().openapi({ description: IDEMPOTENCY_DOC }) });
const AUTH = [401, 403, 429];

export function dataOperations(): DocumentedOperation[] {
  return [
    {
      method: "post", path: "/api/v1/datasets", summary: "Upload a dataset (DEM or stream lines)", permission: "datasets:write", query: J.DatasetUploadQuery,
      description: "Send the file as the raw body (`image/tiff`, `application/geo+json`, `application/zip` with `?filename=`) or as the one file part of `multipart/form-data` (an `epsg` field may precede it). The body is streamed to storage while its SHA-256 and size are taken; its metadata is read in a sandboxed process (memory limit and deadline) before it is accepted. A file that cannot be read answers 422 naming the problem, and nothing is kept. The same bytes uploaded again by the organisation answer 200 with the existing dataset. Idempotent by content: the same file never makes two datasets. In the rare case that another organisation deleted the same bytes while they were being stored, the upload answers 409 with nothing kept: send it again.",
      body: {
        required: true,
        content: {
          "image/tiff": { schema: { type: "string", format: "binary" } },
          "application/geo+json": { schema: { type: "string", format: "binary" } },
          "application/zip": { schema: { type: "string", format: "binary" } },
          "multipart/form-data": { schema: { type: "object", properties: { epsg: { type: "integer" }, file: { type: "string", format: "binary" } } } },
        },
      } as never,
      ok: { status: 201, description: "Accepted (200 when the organisation already had these bytes).", content: json(J.Dataset), headers: { Location: stringHeader("The dataset.") } },
      errors: [...AUTH, 400, 409, 413, 415, 422],
    },
    { method: "get", path: "/api/v1/datasets", summary: "List datasets, newest first", permission: "jobs:read", query: J.DatasetListQuery, ok: { status: 200, description: "A page.", content: json(J.DatasetList) }, errors: [...AUTH, 422] },
    { method: "get", path: "/api/v1/datasets/{id}", summary: "A dataset and its metadata", permission: "jobs:read", params: J.IdParams, ok: { status: 200, description: "The dataset.", content: json(J.Dataset) }, errors: [...AUTH, 404] },
    { method: "delete", path: "/api/v1/datasets/{id}", summary: "Delete a dataset", permission: "datasets:write", params: J.IdParams, description: "Refused with 409 while a queued or running job uses it; finished jobs keep their results.", ok: { status: 204, description: "Deleted." }, errors: [...AUTH, 404, 409] },
    {
      method: "post", path: "/api/v1/jobs", summary: "Queue an analysis", permission: "jobs:write",
      description: `Kinds: ${JOB_KINDS.map((k) => `\`${k}\` — ${KINDS[k].summary} (reads ${KINDS[k].formats.join(" or ")}; parameters: ${paramsName(k)})`).join("; ")}.\n\nThe same dataset bytes, kind, parameters (after defaults) and software version reuse the earlier result at once (\`cachedFrom\` names the job). An organisation runs a limited number of jobs at a time; the rest wait queued.\n\n${IDEMPOTENCY_DOC}`,
      body: { required: true, content: json(J.JobCreateBody) } as never, headers: IdempotencyHeader,
      ok: { status: 202, description: "Queued (or already succeeded from the cache).", content: json(J.Job), headers: { Location: stringHeader("The job.") } },
      errors: [...AUTH, 400, 409, 415, 422],
    },
    { method: "get", path: "/api/v1/jobs", summary: "List jobs, newest first", permission: "jobs:read", query: J.JobListQuery, ok: { status: 200, description: "A page.", content: json(J.JobList) }, errors: [...AUTH, 422] },
    { method: "get", path: "/api/v1/jobs/{id}", summary: "A job's status, stage, progress and timings", permission: "jobs:read", params: J.IdParams, ok: { status: 200, description: "The job.", content: json(J.Job) }, errors: [...AUTH, 404] },
    { method: "post", path: "/api/v1/jobs/{id}/cancel", summary: "Cancel a job", permission: "jobs:write", params: J.IdParams, description: "A queued job is cancelled at once (200); a running one is stopped at the worker's next check, within about a second (202), and its partial artifacts are removed.", ok: { status: 202, description: "Cancel requested (200 when already cancelled).", content: json(J.Job) }, errors: [...AUTH, 404, 409] },
    { method: "get", path: "/api/v1/jobs/{id}/result", summary: "The summary of a succeeded job", permission: "results:read", params: J.IdParams, ok: { status: 200, description: "The result.", content: json(J.JobResult) }, errors: [...AUTH, 404, 409] },
    { method: "get", path: "/api/v1/jobs/{id}/artifacts", summary: "The files of a succeeded job", permission: "results:read", params: J.IdParams, ok: { status: 200, description: "Artifacts.", content: json(J.ArtifactList) }, errors: [...AUTH, 404, 409] },
    {
      method: "get", path: "/api/v1/jobs/{id}/artifacts/{name}", summary: "Download an artifact", permission: "results:read", params: J.ArtifactParams,
      description: "GeoJSON (`application/geo+json`), GeoTIFF (`image/tiff; application=geotiff`) or CSV (`text/csv`). `ETag` is the file's SHA-256; `If-None-Match` answers 304; one `Range: bytes=…` answers 206.",
      ok: {
        status: 200, description: "The file (206 for a range).",
        content: { "application/octet-stream": { schema: { type: "string", format: "binary" } } },
        headers: { ETag: stringHeader("The SHA-256 of the file, quoted."), "Content-Length": stringHeader("Bytes."), "Accept-Ranges": stringHeader("bytes") },
      },
      errors: [...AUTH, 404, 409, 416],
    },
  ];
}

const paramsName = (k: string) => `${k[0].toUpperCase()}${k.slice(1)}Params`;

export function registerDataOperations(registry: OpenAPIRegistry, problem: z.ZodType): void {
  // As JSON Schema (draft 2020-12, which OpenAPI 3.1 uses) straight from zod: the pipelines' schemas are plain zod,
  // without the .openapi() extension registry.register() would call on them.
  for (const k of JOB_KINDS) {
    const { $schema: _dialect, ...schema } = Z.toJSONSchema(KINDS[k].params, { io: "input", unrepresentable: "any" }) as Record<string, unknown>;
    registry.registerComponent("schemas", paramsName(k), schema as never);
  }
  registerOperations(registry, problem, {
    errorText: ERROR_TEXT, okHeaders: RATE_HEADERS, errorHeaders: { 429: { "Retry-After": stringHeader("Seconds to wait."), ...RATE_HEADERS } },
  }, dataOperations());
}
