// npm run analyze -- drainage <dem.tif> [--threshold-km2 X | --auto-threshold] [--out dir]
// Runs lib/pipelines/drainage.ts on a local GeoTIFF and writes summary.json, timings.json and the artifacts.
import { mkdir } from "node:fs/promises";
import path from "node:path";
import { runDrainage, type DrainageParams } from "@/lib/pipelines/drainage";
import { progressOnStderr, runCommand, UsageError, writeArtifacts, writeJson } from "@/scripts/analyze/cli";

const USAGE = "usage: npm run analyze -- drainage <dem.tif> [--threshold-km2 X | --auto-threshold] [--out dir] [--epsg code] [--largest N] [--exclude-highest-order]";

export const main = (argv: string[]) => runCommand(argv, {
  name: "drainage",
  usage: USAGE,
  options: {
    "threshold-km2": { type: "string" },
    "auto-threshold": { type: "boolean", default: false },
    out: { type: "string", default: "drainage-out" },
    epsg: { type: "string" },
    largest: { type: "string" },
    "exclude-highest-order": { type: "boolean", default: false },
    quiet: { type: "boolean", default: false },
  },
  async run(demPath, values) {
    if (values["auto-threshold"] && values["threshold-km2"] !== undefined) throw new UsageError("give --threshold-km2 or --auto-threshold, not both");
    for (const key of ["threshold-km2", "epsg", "largest"] as const) {
      const v = values[key];
      if (v !== undefined && !Number.isFinite(Number(v))) throw new UsageError(`--${key} must be a number, got "${v}"`);
    }
    const params: DrainageParams = {
      channelThreshold: values["auto-threshold"]
        ? { method: "constant-drop" }
        : { method: "area", km2: values["threshold-km2"] === undefined ? 1 : Number(values["threshold-km2"]) },
      excludeHighestOrder: values["exclude-highest-order"],
      ...(values.epsg !== undefined ? { epsg: Number(values.epsg) } : {}),
      ...(values.largest !== undefined ? { basins: { mode: "largest", count: Number(values.largest) } } : {}),
    };
    const outDir = path.resolve(values.out);
    await mkdir(outDir, { recursive: true });
    const result = await runDrainage({ demPath, outDir }, params, { onProgress: progressOnStderr(values.quiet) });
    await writeArtifacts(outDir, result.artifacts);
    await writeJson(outDir, "summary.json", result.summary);
    await writeJson(outDir, "timings.json", result.timingsS);
    const { horton, dimension, channels } = result.summary;
    console.log(JSON.stringify({
      out: outDir,
      thresholdKm2: channels.thresholdKm2,
      highestOrder: horton.highestOrder,
      bifurcationRatio: horton.bifurcationRatio?.value ?? null,
      lengthRatio: horton.lengthRatio?.value ?? null,
      areaRatio: horton.areaRatio?.value ?? null,
      dimension: dimension?.bounded ?? null,
    }));
  },
});
