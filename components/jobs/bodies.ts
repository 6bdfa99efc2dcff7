// The response bodies of the dataset and job routes, as the console reads them. Type-only: the schemas module
// imports the pipelines (node-only), so nothing of it may reach the browser bundle but these types.
import type { z } from "@/lib/api/schemas";
import type { Artifact, Dataset, Job, JobResult } from "@/lib/jobs/schemas";

export type DatasetBody = z.infer<typeof Dataset>;
export type JobBody = z.infer<typeof Job>;
export type JobStatus = JobBody["status"];
export type JobKind = JobBody["kind"];
export type ArtifactBody = z.infer<typeof Artifact>;
export type JobResultBody = z.infer<typeof JobResult>;

export interface Page<T> {
  items: T[];
  nextCursor: string | null;
}

/** Whether a job may still change: the pages poll while one is. */
export const isLive = (status: JobStatus) => status === "queued" || status === "running";

/** Every job query starts with this key, so a submission or a cancel refreshes them all. */
export const JOBS_QUERY_KEY = ["jobs"] as const;
