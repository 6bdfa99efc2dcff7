// npm run analyze -- network <file.geojson|file.zip|file.shp> [--outlet=lon,lat] [--out dir] [options]
// Runs lib/pipelines/network on a local file and writes summary.json and the artifacts into --out.
import { mkdir, readFile } from "node:fs/promises";
import path from "node:path";
import { ZodError } from "zod";
import { networkParamsSchema, runNetwork, type NetworkParams } from "@/lib/pipelines/network";
import { VectorError } from "@/lib/vector/vector-error";
import { runCommand, writeArtifacts, writeJson } from "@/scripts/analyze/cli";

const USAGE = `usage: npm run analyze -- network <file.geojson|file.zip|file.shp> [options]
  --outlet=LON,LAT            outlet point, degrees WGS 84 (write it with "=" when the longitude is negative)
  --out DIR                   output folder (default: <file name>-network beside the input)
  --epsg CODE                 CRS of the lines when the file states none (or to override it)
  --snap-tolerance M          join line ends closer than M metres (default 1)
  --outlet-radius M           how far the outlet may be from a line end or junction (default 100)
  --dangle-length M           drop source overshoots shorter than M metres (default: the snap tolerance)
  --components each|largest   analyse every connected part or only the largest (default each)
  --flow-direction-field F    property: positive/true = digitised downstream
  --id-field F --downstream-id-field G   properties: line id and the id it flows into
  --dem FILE                  GeoTIFF DEM: lowest ends become outlets, links get drops
  --basin FILE                GeoJSON polygon of the basin (drainage density, areas)
  --exclude-highest-order     leave the highest order out of the Horton fits`;

function number(flag: string, value: string | undefined): number | undefined {
  if (value === undefined) return undefined;
  const v = Number(value);
  if (!Number.isFinite(v)) throw new RangeError(`--${flag} must be a number, got ${JSON.stringify(value)}`);
  return v;
}

async function basinFrom(file: string): Promise<unknown> {
  const doc = JSON.parse(await readFile(file, "utf8")) as Record<string, unknown>;
  if (doc.type === "FeatureCollection") return (doc.features as { geometry: unknown }[])[0]?.geometry;
  if (doc.type === "Feature") return doc.geometry;
  return doc;
}

export const main = (argv: string[]) => runCommand(argv, {
  name: "network",
  usage: USAGE,
  options: {
    outlet: { type: "string" }, out: { type: "string" }, epsg: { type: "string" },
    "snap-tolerance": { type: "string" }, "outlet-radius": { type: "string" }, "dangle-length": { type: "string" },
    components: { type: "string" }, "flow-direction-field": { type: "string" }, "id-field": { type: "string" },
    "downstream-id-field": { type: "string" }, dem: { type: "string" }, basin: { type: "string" },
    "exclude-highest-order": { type: "boolean" }, help: { type: "boolean" },
  },
  async run(input, v) {
    const file = path.resolve(input);
    const out = path.resolve(v.out ?? `${file.replace(/\.[^./]+$/, "")}-network`);
    const outlet = v.outlet?.split(",").map((s, i) => number(i === 0 ? "outlet longitude" : "outlet latitude", s.trim()));
    if (outlet && outlet.length !== 2) throw new RangeError(`--outlet must be LON,LAT, got ${JSON.stringify(v.outlet)}`);
    const params: NetworkParams = {
      outlet: outlet as [number, number] | undefined,
      epsg: number("epsg", v.epsg),
      snapToleranceM: number("snap-tolerance", v["snap-tolerance"]),
      outletRadiusM: number("outlet-radius", v["outlet-radius"]),
      dangleLengthM: number("dangle-length", v["dangle-length"]),
      components: v.components as NetworkParams["components"],
      flowDirectionField: v["flow-direction-field"],
      idField: v["id-field"],
      downstreamIdField: v["downstream-id-field"],
      excludeHighestOrder: v["exclude-highest-order"],
      basin: v.basin ? (await basinFrom(v.basin)) as NetworkParams["basin"] : undefined,
    };
    for (const key of Object.keys(params) as (keyof NetworkParams)[]) if (params[key] === undefined) delete params[key];
    const { summary, artifacts } = await runNetwork({ path: file, demPath: v.dem && path.resolve(v.dem) }, networkParamsSchema.parse(params));
    await mkdir(out, { recursive: true });
    await writeJson(out, "summary.json", summary);
    await writeArtifacts(out, artifacts);
    const h = summary.horton;
    console.log(`${summary.network.links} links, highest order ${h.highestOrder}, ` +
      `R_B ${h.bifurcation?.value.toFixed(3) ?? "–"}, R_L ${h.length?.value.toFixed(3) ?? "–"}; ` +
      `${summary.topology.loops.count} loops removed, ${summary.topology.reversedPieces} pieces reversed → ${out}`);
  },
  // the failures a user can cause get one line; anything else is a bug and keeps its stack
  failure(e) {
    if (e instanceof VectorError) return e.detail;
    if (e instanceof ZodError) return `invalid parameters: ${e.issues.map((i) => `${i.path.join(".")}: ${i.message}`).join("; ")}`;
    if (e instanceof RangeError) return e.message;
    return undefined;
  },
});
