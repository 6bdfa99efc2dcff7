// Job handler of kind "surface": lib/pipelines/surface.ts on the dataset's GeoTIFF.
import { fitPointsArtifact, materialize } from "@/jobs/handlers/files";
import type { JobHandler } from "@/jobs/handlers/types";
import { runSurface } from "@/lib/pipelines/surface";

export const surface: JobHandler = async (input, hooks) => {
  const { summary, artifacts, timingsS } = await runSurface({ demPath: input.datasetPath, outDir: input.outDir }, input.params, hooks);
  const files = await Promise.all(artifacts.map((a) => materialize(input.outDir, a)));
  files.push(...(await fitPointsArtifact(input.outDir, summary)));
  return { summary, timingsS: timingsS as Record<string, number>, artifacts: files };
};
