// Job handler of kind "network": lib/pipelines/network.ts on the dataset's GeoJSON or zipped Shapefile.
import { fitPointsArtifact, materialize, readGeoJsonDataset } from "@/jobs/handlers/files";
import type { JobHandler } from "@/jobs/handlers/types";
import { runNetwork } from "@/lib/pipelines/network";

export const network: JobHandler = async (input, hooks) => {
  const started = performance.now();
  const source = input.format === "zip" ? { zipPath: input.datasetPath } : { geojson: await readGeoJsonDataset(input.datasetPath) };
  const { summary, artifacts } = await runNetwork(source, input.params, hooks);
  const files = await Promise.all(artifacts.map((a) => materialize(input.outDir, a)));
  files.push(...(await fitPointsArtifact(input.outDir, summary)));
  return { summary: summary as unknown as Record<string, unknown>, timingsS: { total: (performance.now() - started) / 1000 }, artifacts: files };
};
