// npm run analyze -- surface <dem.tif> [--out dir] [--normalisation true-units|grid-extent] [--window N] [--step N]
//   [--min-scale-m X --max-scale-m Y] [--epsg code] [--z-factor F] [--band B]
// Runs lib/pipelines/surface.ts on a local GeoTIFF and writes summary.json, timings.json and local-dimension.tif.
import { mkdir } from "node:fs/promises";
import path from "node:path";
import { runSurface, type SurfaceParams } from "@/lib/pipelines/surface";
import { dimensionDigest, progressOnStderr, runCommand, UsageError, writeJson } from "@/scripts/analyze/cli";

const USAGE = "usage: npm run analyze -- surface <dem.tif> [--out dir] [--normalisation true-units|grid-extent] " +
  "[--window cells] [--step cells] [--min-scale-m X --max-scale-m Y] [--epsg code] [--z-factor F] [--band B] [--quiet]";

export const main = (argv: string[]) => runCommand(argv, {
  name: "surface",
  usage: USAGE,
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
  async run(demPath, values) {
    if ((values["min-scale-m"] === undefined) !== (values["max-scale-m"] === undefined)) throw new UsageError("give both --min-scale-m and --max-scale-m, or neither");
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
    const outDir = path.resolve(values.out);
    await mkdir(outDir, { recursive: true });
    const result = await runSurface({ demPath, outDir }, params, { onProgress: progressOnStderr(values.quiet) });
    await writeJson(outDir, "summary.json", result.summary);
    await writeJson(outDir, "timings.json", result.timingsS);
    console.log(JSON.stringify({ out: outDir, dimensions: dimensionDigest(result.summary.dimensions), artifacts: result.artifacts.map((a) => a.name) }, null, 2));
  },
});
