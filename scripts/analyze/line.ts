// npm run analyze -- line <lines.geojson> [--out dir] [--min-ruler-m X --max-ruler-m Y] [--rulers N]
//   [--min-scale-m X --max-scale-m Y] [--epsg code]
// Runs lib/pipelines/line.ts on a local GeoJSON file and writes summary.json and timings.json.
import { mkdir, readFile, writeFile } from "node:fs/promises";
import path from "node:path";
import { parseArgs } from "node:util";
import { runLine, type LineParams } from "@/lib/pipelines/line";
import { parseGeoJsonText } from "@/lib/vector/read-geojson";

const USAGE = "usage: npm run analyze -- line <lines.geojson> [--out dir] [--min-ruler-m X --max-ruler-m Y] [--rulers N] " +
  "[--min-scale-m X --max-scale-m Y] [--epsg code]";

export async function main(argv: string[]): Promise<number> {
  let parsed;
  try {
    parsed = parseArgs({
      args: argv,
      allowPositionals: true,
      options: {
        out: { type: "string", default: "line-out" },
        "min-ruler-m": { type: "string" },
        "max-ruler-m": { type: "string" },
        rulers: { type: "string" },
        "min-scale-m": { type: "string" },
        "max-scale-m": { type: "string" },
        epsg: { type: "string" },
      },
    });
  } catch (err) {
    console.error(`${(err as Error).message}\n${USAGE}`);
    return 2;
  }
  const { values, positionals } = parsed;
  if (positionals.length !== 1) { console.error(USAGE); return 2; }
  for (const [a, b] of [["min-ruler-m", "max-ruler-m"], ["min-scale-m", "max-scale-m"]] as const) {
    if ((values[a] === undefined) !== (values[b] === undefined)) { console.error(`give both --${a} and --${b}, or neither\n${USAGE}`); return 2; }
  }
  const params: LineParams = {
    ...(values["min-ruler-m"] !== undefined ? { rulers: { minM: Number(values["min-ruler-m"]), maxM: Number(values["max-ruler-m"]) } } : {}),
    ...(values.rulers !== undefined ? { rulerCount: Number(values.rulers) } : {}),
    ...(values["min-scale-m"] !== undefined ? { scalingRange: { minM: Number(values["min-scale-m"]), maxM: Number(values["max-scale-m"]) } } : {}),
    ...(values.epsg !== undefined ? { epsg: Number(values.epsg) } : {}),
  };
  const outDir = path.resolve(values.out!);
  try {
    const geojson = parseGeoJsonText(await readFile(positionals[0], "utf8"));
    const result = await runLine({ geojson }, params);
    await mkdir(outDir, { recursive: true });
    await writeFile(path.join(outDir, "summary.json"), JSON.stringify(result.summary, null, 2) + "\n");
    await writeFile(path.join(outDir, "timings.json"), JSON.stringify(result.timingsS, null, 2) + "\n");
    console.log(JSON.stringify({
      out: outDir,
      dimensions: result.summary.dimensions.map((d) => ({ estimator: d.estimator, D: Number(d.D.toFixed(3)), ci95: d.ci95.map((v) => Number(v.toFixed(3))), rSquared: Number(d.rSquared.toFixed(4)), rangeM: [d.rangeMinM, d.rangeMaxM].map((v) => Number(v.toFixed(1))) })),
    }, null, 2));
    return 0;
  } catch (err) {
    console.error(`line: ${(err as Error).message}`);
    return 1;
  }
}
