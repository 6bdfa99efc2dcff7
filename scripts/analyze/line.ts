// npm run analyze -- line <lines.geojson> [--out dir] [--min-ruler-m X --max-ruler-m Y] [--rulers N]
//   [--min-scale-m X --max-scale-m Y] [--epsg code]
// Runs lib/pipelines/line.ts on a local GeoJSON file and writes summary.json and timings.json.
import { mkdir, readFile } from "node:fs/promises";
import path from "node:path";
import { runLine, type LineParams } from "@/lib/pipelines/line";
import { parseGeoJsonText } from "@/lib/vector/read-geojson";
import { dimensionDigest, runCommand, UsageError, writeJson } from "@/scripts/analyze/cli";

const USAGE = "usage: npm run analyze -- line <lines.geojson> [--out dir] [--min-ruler-m X --max-ruler-m Y] [--rulers N] " +
  "[--min-scale-m X --max-scale-m Y] [--epsg code]";

export const main = (argv: string[]) => runCommand(argv, {
  name: "line",
  usage: USAGE,
  options: {
    out: { type: "string", default: "line-out" },
    "min-ruler-m": { type: "string" },
    "max-ruler-m": { type: "string" },
    rulers: { type: "string" },
    "min-scale-m": { type: "string" },
    "max-scale-m": { type: "string" },
    epsg: { type: "string" },
  },
  async run(file, values) {
    for (const [a, b] of [["min-ruler-m", "max-ruler-m"], ["min-scale-m", "max-scale-m"]] as const) {
      if ((values[a] === undefined) !== (values[b] === undefined)) throw new UsageError(`give both --${a} and --${b}, or neither`);
    }
    const params: LineParams = {
      ...(values["min-ruler-m"] !== undefined ? { rulers: { minM: Number(values["min-ruler-m"]), maxM: Number(values["max-ruler-m"]) } } : {}),
      ...(values.rulers !== undefined ? { rulerCount: Number(values.rulers) } : {}),
      ...(values["min-scale-m"] !== undefined ? { scalingRange: { minM: Number(values["min-scale-m"]), maxM: Number(values["max-scale-m"]) } } : {}),
      ...(values.epsg !== undefined ? { epsg: Number(values.epsg) } : {}),
    };
    const outDir = path.resolve(values.out);
    const geojson = parseGeoJsonText(await readFile(file, "utf8"));
    const result = await runLine({ geojson }, params);
    await mkdir(outDir, { recursive: true });
    await writeJson(outDir, "summary.json", result.summary);
    await writeJson(outDir, "timings.json", result.timingsS);
    console.log(JSON.stringify({ out: outDir, dimensions: dimensionDigest(result.summary.dimensions) }, null, 2));
  },
});
