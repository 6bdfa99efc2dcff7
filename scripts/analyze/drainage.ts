// npm run analyze -- drainage <dem.tif> [--threshold-km2 X | --auto-threshold] [--out dir]
// Runs lib/pipelines/drainage.ts on a local GeoTIFF and writes summary.json, timings.json and the artifacts.
import { copyFile, mkdir, writeFile } from "node:fs/promises";
import path from "node:path";
import { parseArgs } from "node:util";
import { runDrainage, type DrainageParams } from "@/lib/pipelines/drainage";

const USAGE = "usage: npm run analyze -- drainage <dem.tif> [--threshold-km2 X | --auto-threshold] [--out dir] [--epsg code] [--largest N] [--exclude-highest-order]";

export async function main(argv: string[]): Promise<number> {
  let parsed;
  try {
    parsed = parseArgs({
      args: argv,
      allowPositionals: true,
      options: {
        "threshold-km2": { type: "string" },
        "auto-threshold": { type: "boolean", default: false },
        out: { type: "string", default: "drainage-out" },
        epsg: { type: "string" },
        largest: { type: "string" },
        "exclude-highest-order": { type: "boolean", default: false },
        quiet: { type: "boolean", default: false },
      },
    });
  } catch (err) {
    console.error(`${(err as Error).message}\n${USAGE}`);
    return 2;
  }
  const { values, positionals } = parsed;
  if (positionals.length !== 1) { console.error(USAGE); return 2; }
  if (values["auto-threshold"] && values["threshold-km2"] !== undefined) {
    console.error(`give --threshold-km2 or --auto-threshold, not both\n${USAGE}`);
    return 2;
  }
  const numeric = ["threshold-km2", "epsg", "largest"] as const;
  for (const key of numeric) {
    const v = values[key];
    if (v !== undefined && !Number.isFinite(Number(v))) { console.error(`--${key} must be a number, got "${v}"\n${USAGE}`); return 2; }
  }
  const params: DrainageParams = {
    channelThreshold: values["auto-threshold"]
      ? { method: "constant-drop" }
      : { method: "area", km2: values["threshold-km2"] === undefined ? 1 : Number(values["threshold-km2"]) },
    excludeHighestOrder: values["exclude-highest-order"],
    ...(values.epsg !== undefined ? { epsg: Number(values.epsg) } : {}),
    ...(values.largest !== undefined ? { basins: { mode: "largest", count: Number(values.largest) } } : {}),
  };
  const outDir = path.resolve(values.out!);
  await mkdir(outDir, { recursive: true });
  try {
    const result = await runDrainage({ demPath: positionals[0], outDir }, params, {
      onProgress: values.quiet ? undefined : (stage, fraction) => process.stderr.write(`${(fraction * 100).toFixed(0).padStart(3)}% ${stage}\n`),
    });
    for (const a of result.artifacts) {
      const target = path.join(outDir, a.name);
      if (a.bytes) await writeFile(target, a.bytes);
      else if (a.path && path.resolve(a.path) !== target) await copyFile(a.path, target);
    }
    await writeFile(path.join(outDir, "summary.json"), JSON.stringify(result.summary, null, 2) + "\n");
    await writeFile(path.join(outDir, "timings.json"), JSON.stringify(result.timingsS, null, 2) + "\n");
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
    return 0;
  } catch (err) {
    console.error(`drainage: ${(err as Error).message}`);
    return 1;
  }
}
