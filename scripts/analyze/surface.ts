// npm run analyze -- surface <dem.tif> [--out dir] [--normalisation true-units|grid-extent] [--window N] [--step N]
//   [--min-scale-m X --max-scale-m Y] [--epsg code] [--z-factor F] [--band B]
// Runs lib/pipelines/surface.ts on a local GeoTIFF and writes summary.json, timings.json and local-dimension.tif.
import { mkdir, writeFile } from "node:fs/promises";
import path from "node:path";
import { parseArgs } from "node:util";
import { runSurface, type SurfaceParams } from "@/lib/pipelines/surface";

const USAGE = "usage: npm run analyze -- surface <dem.tif> [--out dir] [--normalisation true-units|grid-extent] " +
  "[--window cells] [--step cells] [--min-scale-m X --max-scale-m Y] [--epsg code] [--z-factor F] [--band B] [--quiet]";

export async function main(argv: string[]): Promise<number> {
  let parsed;
  try {
    parsed = parseArgs({
      args: argv,
      allowPositionals: true,
      options: {
        out: { type: "string", default: "surface-out" },
        normalisation: { type: "string" },
        window: { type: "string" },
        step: { type: "string" },
        "min-scale-m": { type: "string" },
        "max-scale-m": { type: "string" },
        epsg: { type: "string" },
        "z-factor": { type: "string" },
        band: { type: "string" },
        quiet: { type: "boolean", default: false },
      },
    });
  } catch (err) {
    console.error(`${(err as Error).message}\n${USAGE}`);
    return 2;
  }
  const { values, positionals } = parsed;
  if (positionals.length !== 1) { console.error(USAGE); return 2; }
  if ((values["min-scale-m"] === undefined) !== (values["max-scale-m"] === undefined)) {
    console.error(`give both --min-scale-m and --max-scale-m, or neither\n${USAGE}`);
    return 2;
  }
  const num = (v: string | undefined) => (v === undefined ? undefined : Number(v));
  const params: SurfaceParams = {
    ...(values.normalisation !== undefined ? { cubeNormalisation: values.normalisation as "true-units" | "grid-extent" } : {}),
    ...(values.window !== undefined ? { localWindowCells: num(values.window) } : {}),
    ...(values.step !== undefined ? { localStepCells: num(values.step) } : {}),
    ...(values["min-scale-m"] !== undefined ? { scalingRange: { minM: num(values["min-scale-m"])!, maxM: num(values["max-scale-m"])! } } : {}),
    ...(values.epsg !== undefined ? { epsg: num(values.epsg) } : {}),
    ...(values["z-factor"] !== undefined ? { zFactor: num(values["z-factor"]) } : {}),
    ...(values.band !== undefined ? { band: num(values.band) } : {}),
  };
  const outDir = path.resolve(values.out!);
  await mkdir(outDir, { recursive: true });
  try {
    const result = await runSurface({ demPath: positionals[0], outDir }, params, {
      onProgress: values.quiet ? undefined : (stage, fraction) => process.stderr.write(`${(fraction * 100).toFixed(0).padStart(3)}% ${stage}\n`),
    });
    await writeFile(path.join(outDir, "summary.json"), JSON.stringify(result.summary, null, 2) + "\n");
    await writeFile(path.join(outDir, "timings.json"), JSON.stringify(result.timingsS, null, 2) + "\n");
    console.log(JSON.stringify({
      out: outDir,
      dimensions: result.summary.dimensions.map((d) => ({ estimator: d.estimator, D: Number(d.D.toFixed(3)), ci95: d.ci95.map((v) => Number(v.toFixed(3))), rSquared: Number(d.rSquared.toFixed(4)), rangeM: [d.rangeMinM, d.rangeMaxM].map((v) => Number(v.toFixed(1))) })),
      artifacts: result.artifacts.map((a) => a.name),
    }, null, 2));
    return 0;
  } catch (err) {
    console.error(`surface: ${(err as Error).message}`);
    return 1;
  }
}
