// Job handler of kind "drainage": lib/pipelines/drainage.ts on the dataset's GeoTIFF.
import { csvArtifact, fitPointsArtifact, materialize } from "@/jobs/handlers/files";
import type { JobHandler } from "@/jobs/handlers/types";
import { hortonOrdersCsv } from "@/lib/jobs/csv-tables";
import { runDrainage } from "@/lib/pipelines/drainage";

export const drainage: JobHandler = async (input, hooks) => {
  const { summary, artifacts, timingsS } = await runDrainage({ demPath: input.datasetPath, outDir: input.outDir }, input.params, hooks);
  const files = await Promise.all(artifacts.map((a) => materialize(input.outDir, a)));
  files.push(await csvArtifact(input.outDir, "horton-orders.csv", hortonOrdersCsv(summary.horton.table)));
  files.push(...(await fitPointsArtifact(input.outDir, summary)));
  return { summary, timingsS: timingsS as Record<string, number>, artifacts: files };
};
