// The one shape every job handler has: a stored dataset file and validated parameters in, the pipeline's
// deterministic summary, its timings and artifact files out. The worker calls them the same way in tests.
import type { DatasetFormat } from "@/lib/jobs/kinds";

export interface HandlerInput {
  /** Local path of the dataset's bytes (no extension: content-addressed). */
  datasetPath: string;
  format: DatasetFormat;
  params: Record<string, unknown>;
  /** Fresh directory for this attempt's artifact files. */
  outDir: string;
}

export interface HandlerHooks {
  onProgress(stage: string, fraction: number): void;
  signal?: AbortSignal;
}

export interface ArtifactFile {
  name: string;
  mediaType: string;
  path: string;
}

export interface HandlerOutput {
  summary: Record<string, unknown>;
  timingsS: Record<string, number>;
  artifacts: ArtifactFile[];
}

export type JobHandler = (input: HandlerInput, hooks: HandlerHooks) => Promise<HandlerOutput>;
