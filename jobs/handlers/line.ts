// Job handler of kind "line": lib/pipelines/line.ts on the dataset's GeoJSON lines.
import { fitPointsArtifact, readGeoJsonDataset } from "@/jobs/handlers/files";
import type { JobHandler } from "@/jobs/handlers/types";
import { runLine } from "@/lib/pipelines/line";

export const line: JobHandler = async (input, hooks) => {
  const { summary, timingsS } = await runLine({ geojson: await readGeoJsonDataset(input.datasetPath) }, input.params, hooks);
  return { summary, timingsS: timingsS as Record<string, number>, artifacts: await fitPointsArtifact(input.outDir, summary) };
};
