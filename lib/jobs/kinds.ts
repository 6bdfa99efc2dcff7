// The job kinds: each names its pipeline's parameter schema (the one the pipeline parses with, so the API,
// the OpenAPI document and the worker agree) and the dataset formats it reads.
import type { z } from "zod";
import { drainageParamsSchema } from "@/lib/pipelines/drainage";
import { lineParamsSchema } from "@/lib/pipelines/line";
import { networkParamsSchema } from "@/lib/pipelines/network";
import { surfaceParamsSchema } from "@/lib/pipelines/surface";

export const JOB_KINDS = ["drainage", "surface", "network", "line"] as const;
export type JobKind = (typeof JOB_KINDS)[number];

export type DatasetFormat = "geotiff" | "geojson" | "zip";

export interface KindSpec {
  summary: string;
  params: z.ZodType;
  formats: readonly DatasetFormat[];
}

export const KINDS: Record<JobKind, KindSpec> = {
  drainage: {
    summary: "Drainage analysis of a DEM: conditioned flow, channels, Strahler orders, Horton/Hack/Tokunaga laws, drainage density",
    params: drainageParamsSchema,
    formats: ["geotiff"],
  },
  surface: {
    summary: "Surface fractal dimension of a DEM: semivariogram, cube counting, power spectrum, triangular prism, local map, transects",
    params: surfaceParamsSchema,
    formats: ["geotiff"],
  },
  network: {
    summary: "Network analysis of mapped stream lines: topology, Strahler/Shreve orders, Horton/Hack/Tokunaga laws, dimensions",
    params: networkParamsSchema,
    formats: ["geojson", "zip"],
  },
  line: {
    summary: "Fractal dimension of mapped lines by the divider method and box counting",
    params: lineParamsSchema,
    formats: ["geojson"],
  },
};

export const isJobKind = (k: string): k is JobKind => (JOB_KINDS as readonly string[]).includes(k);

/** pg-boss queue of a kind: one per kind, so a slow kind cannot starve the others. */
export const queueOf = (kind: JobKind) => `analysis-${kind}`;

/** PostgreSQL NOTIFY channel on which a submission names its kind, so an idle worker fetches at once instead of
 *  at its next poll; the poll remains the guarantee (a notification is lost while no worker listens). */
export const JOB_QUEUED_CHANNEL = "rillscale_job_queued";
