// Mapped stream networks (GeoJSON, zipped Shapefile) through the one network model: Strahler (1957) orders,
// Shreve (1966) magnitudes, Horton (1945) ratios, Tarboton et al. (1988) dimension, Hack (1957), Tokunaga (1978),
// Richardson–Mandelbrot (1967) divider and box counting — each from its own module; this file only composes them.
import { readFile, stat } from "node:fs/promises";
import path from "node:path";
import proj4 from "proj4";
import { z } from "zod";
import { boxCountLines, type BoxCountingResult } from "@/lib/fractal/box-counting";
import { divider, type DividerResult } from "@/lib/fractal/divider";
import type { Polylines } from "@/lib/fractal/polylines";
import { networkDimension, type NetworkDimension } from "@/lib/network/dimension";
import { drainageDensity, type DrainageDensity } from "@/lib/network/drainage-density";
import { networkFromLines, type OrientationHint, type TopologyReport } from "@/lib/network/from-lines";
import { hack, mainStreamLength, type HackResult } from "@/lib/network/hack";
import { horton, type HortonRatio, type HortonResult } from "@/lib/network/horton";
import { topologicalOrder, upstreamLinks, type StreamNetwork } from "@/lib/network/model";
import { shreveMagnitude } from "@/lib/network/shreve";
import { strahlerOrder } from "@/lib/network/strahler";
import { tokunaga, type TokunagaResult } from "@/lib/network/tokunaga";
import { upstreamLength } from "@/lib/network/upstream-length";
import type { CrsInfo } from "@/lib/raster/crs";
import { geodesicRingArea } from "@/lib/raster/geodesy";
import { readDem } from "@/lib/raster/read-geotiff";
import { lonLatTransformer } from "@/lib/raster/reproject";
import { MAX_GEOJSON_BYTES } from "@/lib/vector/limits";
import { parseGeoJsonText, readGeoJson, type VectorLines } from "@/lib/vector/read-geojson";
import { readShapefile, readShapefileZip } from "@/lib/vector/read-shapefile";
import { resolveLinesCrs } from "@/lib/vector/resolve-crs";
import { VectorError } from "@/lib/vector/vector-error";

const LONLAT = "+proj=longlat +datum=WGS84 +no_defs";
/** Decimal places of degrees in the GeoJSON output: 1e-7° is about 1 cm, far below any snapping tolerance. */
const LONLAT_DECIMALS = 7;
const utf8 = new TextEncoder();

const position = z.tuple([z.number().min(-180).max(180), z.number().min(-90).max(90)]);
const ring = z.array(position).min(4);
const basinGeometry = z.union([
  z.object({ type: z.literal("Polygon"), coordinates: z.array(ring).min(1) }),
  z.object({ type: z.literal("MultiPolygon"), coordinates: z.array(z.array(ring).min(1)).min(1) }),
]);

export const networkParamsSchema = z
  .object({
    epsg: z.number().int().min(1).max(999_999).optional()
      .describe("EPSG code of the lines' coordinates; overrides the file's CRS, and is required when the file states none (a Shapefile without .prj)"),
    outlet: position.optional()
      .describe("outlet point [longitude, latitude], degrees WGS 84; snapped to the nearest line end or junction within outletRadiusM. Without it each component drains to its lowest end (with a DEM) or to the end that leaves the fewest lines reversed"),
    outletRadiusM: z.number().positive().max(100_000).default(100)
      .describe("how far the outlet point may be from a line end or junction, m; default 100, at most 100 000"),
    snapToleranceM: z.number().min(0).max(1_000).default(1)
      .describe("line ends closer than this are joined, and a line end this close to another line splits it, m; default 1, 0–1000"),
    dangleLengthM: z.number().min(0).max(10_000).optional()
      .describe("source lines shorter than this that hang off a junction are dropped as digitising overshoots, m; default the snapping tolerance, 0 keeps all, at most 10 000"),
    components: z.enum(["each", "largest"]).default("each")
      .describe("analyse every connected part of the network, or only the largest (the outlet's, when an outlet is given); default each"),
    flowDirectionField: z.string().min(1).max(100).optional()
      .describe("feature property saying whether a line is digitised downstream: a positive number or true = downstream, negative or false = upstream"),
    idField: z.string().min(1).max(100).optional()
      .describe("feature property holding each line's id; with downstreamIdField, the network's outlets follow the downstream references"),
    downstreamIdField: z.string().min(1).max(100).optional()
      .describe("feature property holding the id of the line each line flows into (empty or unknown at an outlet)"),
    excludeHighestOrder: z.boolean().default(false)
      .describe("leave the highest Strahler order (one or a few streams) out of the Horton fits; default false"),
    confidence: z.number().gt(0.5).lt(1).default(0.95).describe("confidence level of every interval; default 0.95"),
    basin: basinGeometry.optional()
      .describe("basin outline as a GeoJSON Polygon or MultiPolygon in lon/lat: gives drainage density, and sub-basin areas from upstream channel length at that density (for R_A and Hack's law)"),
  })
  .strict()
  .refine((p) => (p.idField === undefined) === (p.downstreamIdField === undefined), { message: "idField and downstreamIdField go together", path: ["downstreamIdField"] })
  .refine((p) => !(p.flowDirectionField && p.idField), { message: "give either flowDirectionField or idField/downstreamIdField, not both", path: ["flowDirectionField"] });

export type NetworkParams = z.input<typeof networkParamsSchema>;

/** The lines to read, and optionally a DEM (GeoTIFF path) whose elevations choose the outlets and give drops. */
export type NetworkInput = ({ geojson: unknown } | { zipPath: string } | { path: string }) & { demPath?: string };

export interface PipelineHooks {
  onProgress?(stage: "read" | "topology" | "analysis" | "output", fraction: number): void;
  signal?: AbortSignal;
}

/** Same shape as the drainage pipeline's artifacts: the bytes of a small file to store under `name`. */
export interface NetworkArtifact {
  name: string;
  mediaType: string;
  bytes: Uint8Array;
}

/** A Horton ratio without its full regression object: value, interval and the points fitted. */
export interface RatioSummary {
  value: number;
  ci: [number, number];
  stdError: number;
  rSquared: number;
  ordersUsed: number[];
  lnValues: number[];
}

export interface NetworkSummary {
  kind: "network";
  input: {
    lines: number;
    features: number;
    skipped: VectorLines["skipped"];
    crs: { name: string; epsg: number | null; geographic: boolean; from: VectorLines["crs"]["kind"] | "epsg-parameter" };
  };
  topology: TopologyReport;
  network: { links: number; sources: number; outlets: number; highestOrder: number; totalLengthM: number };
  /** how sub-basin areas were obtained for R_A, Hack's law and drainage density */
  areaBasis: string;
  orders: { order: number; streams: number; links: number; meanLengthM: number; totalLengthM: number; meanAreaM2: number | null; meanSlope: number | null }[];
  horton: { highestOrder: number; ordersUsed: number[]; bifurcation: RatioSummary | null; length: RatioSummary | null; area: RatioSummary | null; slope: RatioSummary | null };
  dimension: (NetworkDimension & { formula: string }) | { value: null; reason: string };
  hack: HackResult | { value: null; reason: string };
  tokunaga: Omit<TokunagaResult, "fit">;
  drainageDensity: (DrainageDensity & { basinAreaFrom: string }) | null;
  mainStemDivider: (Omit<DividerResult, "coordinates"> & { mainStemLengthM: number; coordinates: Polylines["coordinates"] }) | { value: null; reason: string };
  planformBoxCounting: BoxCountingResult | { value: null; reason: string };
  /** each connected part on its own (the longest COMPONENTS_LISTED): the pooled results above cover all */
  components: ComponentSummary[];
  units: Record<string, string>;
  params: z.output<typeof networkParamsSchema>;
}

export interface ComponentSummary {
  outlet: { lon: number; lat: number };
  links: number;
  highestOrder: number;
  totalLengthM: number;
  bifurcationRatio: number | null;
  lengthRatio: number | null;
}

/** Parts listed one by one in the summary; a national layer can have thousands of small ones. */
const COMPONENTS_LISTED = 100;

/** Reads, builds the topology, analyses and writes the ordered network. Deterministic: no timings. */
export async function runNetwork(input: NetworkInput, params: NetworkParams, hooks: PipelineHooks = {}): Promise<{ summary: NetworkSummary; artifacts: NetworkArtifact[] }> {
  const p = networkParamsSchema.parse(params);
  const progress = (stage: "read" | "topology" | "analysis" | "output", f: number) => {
    hooks.signal?.throwIfAborted();
    hooks.onProgress?.(stage, f);
  };
  progress("read", 0);
  const vector = await readLines(input);
  const crs = resolveLinesCrs(vector.crs, vector.lines, p.epsg);
  progress("read", 1);

  const toCrs = proj4(LONLAT, crs.proj4);
  const outlet = p.outlet ? (() => { const [x, y] = toCrs.forward([p.outlet[0], p.outlet[1]]); return { x, y, radiusM: p.outletRadiusM }; })() : undefined;
  const elevationAt = input.demPath ? await demSampler(input.demPath, crs, hooks.signal) : undefined;
  progress("topology", 0);
  const { network, report } = networkFromLines(vector.lines, {
    crs: crs.proj4,
    snapToleranceM: p.snapToleranceM,
    dangleLengthM: p.dangleLengthM ?? p.snapToleranceM,
    outlet,
    elevationAt,
    orientation: orientationHint(vector, p),
    components: p.components,
  });
  if (network.links.length === 0) throw new VectorError("no_lines", "no link is left after the topology was built");
  progress("topology", 1);

  // sub-basin areas: upstream channel length over a uniform drainage density (Horton 1945)
  const upLength = upstreamLength(network);
  const basinAreaM2 = p.basin ? basinArea(p.basin) : null;
  const metresPerArea = basinAreaM2 !== null ? basinAreaM2 / report.networkLengthM : 1;
  const areaBasis = basinAreaM2 !== null
    ? `upstream channel length × (basin area / total channel length) = ${metresPerArea.toPrecision(6)} m: a uniform drainage density over the basin polygon`
    : "upstream channel length × 1 m (no basin polygon): R_A and the Hack exponent are independent of this constant; the Hack coefficient and areas are not physical";
  const areaNetwork: StreamNetwork = { crs: network.crs, links: network.links.map((l, i) => ({ ...l, areaM2: upLength[i] * metresPerArea })) };
  if (basinAreaM2 !== null) network.links.forEach((l, i) => { l.areaM2 = areaNetwork.links[i].areaM2; });

  const order = strahlerOrder(network);
  const magnitude = shreveMagnitude(network);
  const hortonResult = horton(areaNetwork, { excludeHighestOrder: p.excludeHighestOrder, confidence: p.confidence });
  progress("analysis", 0.3);
  const tokunagaResult = tokunaga(network, { confidence: p.confidence });
  const hackResult = attempt(() => hack(areaNetwork, { confidence: p.confidence }));
  const rb = hortonResult.bifurcation?.value, rl = hortonResult.length?.value;
  const dimension = rb !== undefined && rl !== undefined
    ? attempt(() => ({ ...networkDimension(rb, rl), formula: "D = ln R_B / ln R_L, bounded to [1, 2]" }))
    : { value: null, reason: "R_B or R_L could not be fitted (fewer than two orders)" };
  const density = basinAreaM2 !== null ? { ...drainageDensity(areaNetwork), basinAreaFrom: "geodesic area of the basin polygon (Karney 2013)" } : null;
  progress("analysis", 0.6);
  const planar = planarPolylines(crs);
  const stem = mainStem(network);
  const stemDivider = attempt(() => {
    const d = divider(planar([stem.path]));
    return { ...d, mainStemLengthM: stem.lengthM };
  });
  const boxes = attempt(() => boxCountLines(planar(network.links.map((l) => l.path))));
  progress("analysis", 1);

  const toLonLat = lonLatTransformer(crs);
  const orders = ordersTable(network, order, hortonResult);
  const summary: NetworkSummary = {
    kind: "network",
    input: {
      lines: vector.lines.length,
      features: vector.properties.length,
      skipped: vector.skipped,
      crs: { name: crs.name, epsg: crs.epsg, geographic: crs.geographic, from: p.epsg !== undefined ? "epsg-parameter" : vector.crs.kind },
    },
    topology: report,
    network: {
      links: network.links.length,
      sources: upstreamLinks(network).filter((u) => u.length === 0).length,
      outlets: network.links.filter((l) => l.downstream < 0).length,
      highestOrder: hortonResult.highestOrder,
      totalLengthM: report.networkLengthM,
    },
    areaBasis,
    orders,
    horton: {
      highestOrder: hortonResult.highestOrder,
      ordersUsed: hortonResult.ordersUsed,
      bifurcation: ratioSummary(hortonResult.bifurcation),
      length: ratioSummary(hortonResult.length),
      area: ratioSummary(hortonResult.area),
      slope: ratioSummary(hortonResult.slope),
    },
    dimension,
    hack: hackResult,
    tokunaga: withoutFit(tokunagaResult),
    drainageDensity: density,
    mainStemDivider: stemDivider,
    planformBoxCounting: boxes,
    components: componentSummaries(network, p, toLonLat),
    units: {
      lengths: "m", areas: "m²", slopes: "m/m", drainageDensity: "km/km²", hackCoefficient: "km per km²^h",
      ratios: "dimensionless", dimensions: "dimensionless", locations: "lon/lat degrees WGS 84 and the lines' CRS",
    },
    params: p,
  };
  progress("output", 0.5);
  const artifacts: NetworkArtifact[] = [
    { name: "network.geojson", mediaType: "application/geo+json", bytes: utf8.encode(JSON.stringify(networkGeoJson(network, order, magnitude, toLonLat, basinAreaM2 !== null))) },
    { name: "orders.csv", mediaType: "text/csv", bytes: utf8.encode(ordersCsv(orders)) },
    { name: "topology.geojson", mediaType: "application/geo+json", bytes: utf8.encode(JSON.stringify(topologyGeoJson(report))) },
  ];
  progress("output", 1);
  return { summary, artifacts };
}

async function readLines(input: NetworkInput): Promise<VectorLines> {
  if ("geojson" in input) return readGeoJson(input.geojson);
  if ("zipPath" in input) return readShapefileZip(input.zipPath);
  const file = input.path;
  const ext = path.extname(file).toLowerCase();
  if (ext === ".zip") return readShapefileZip(file);
  if (ext === ".geojson" || ext === ".json") {
    const size = (await stat(file)).size;
    if (size > MAX_GEOJSON_BYTES) throw new VectorError("file_too_large", `the GeoJSON file is ${size} bytes; at most ${MAX_GEOJSON_BYTES} are accepted`);
    return readGeoJson(parseGeoJsonText(await readFile(file, "utf8")));
  }
  if (ext === ".shp") {
    const stem = file.slice(0, -4);
    const optional = async (suffix: string) => readFile(stem + suffix).catch(() => undefined);
    const [shp, dbf, prj, cpg] = await Promise.all([readFile(file), optional(".dbf"), optional(".prj"), optional(".cpg")]);
    return readShapefile({ shp, dbf, prj: prj?.toString("utf8"), cpg: cpg?.toString("utf8") });
  }
  throw new VectorError("unsupported_file", `${JSON.stringify(path.basename(file))} is not .geojson, .json, .zip or .shp`);
}

/** Per-line orientation hints from the attribute fields the user named. */
function orientationHint(vector: VectorLines, p: z.output<typeof networkParamsSchema>): OrientationHint | undefined {
  const value = (line: number, field: string) => vector.properties[vector.featureOf[line]]?.[field];
  const n = vector.lines.length;
  const requireField = (field: string) => {
    if (!vector.properties.some((props) => props !== null && field in props)) {
      throw new VectorError("bad_attribute", `no feature has the property ${JSON.stringify(field)}`);
    }
  };
  if (p.flowDirectionField) {
    requireField(p.flowDirectionField);
    const signs = new Int8Array(n);
    for (let l = 0; l < n; l++) {
      const v = value(l, p.flowDirectionField);
      signs[l] = typeof v === "boolean" ? (v ? 1 : -1) : typeof v === "number" && Number.isFinite(v) ? Math.sign(v) : 0;
    }
    return { kind: "signs", signs };
  }
  if (p.idField && p.downstreamIdField) {
    requireField(p.idField);
    const lineOfId = new Map<string, number>();
    for (let l = 0; l < n; l++) {
      const id = value(l, p.idField);
      if ((typeof id === "string" || typeof id === "number") && !lineOfId.has(String(id))) lineOfId.set(String(id), l);
    }
    const downstreamOf = new Int32Array(n).fill(-1);
    for (let l = 0; l < n; l++) {
      const d = value(l, p.downstreamIdField);
      if (typeof d === "string" || typeof d === "number") downstreamOf[l] = lineOfId.get(String(d)) ?? -1;
    }
    return { kind: "downstream-line", downstreamOf };
  }
  return undefined;
}

/** Elevation at a point of the lines' CRS from the DEM's nearest cell (NaN outside or on nodata). */
async function demSampler(demPath: string, crs: CrsInfo, signal?: AbortSignal): Promise<(x: number, y: number) => number> {
  const dem = await readDem(demPath, { signal });
  const { originX, originY, pixelSizeX, pixelSizeY } = dem.georef.transform;
  const { data, width, height } = dem.elevation;
  const toDem = proj4(crs.proj4, dem.georef.crs.proj4);
  return (x, y) => {
    const [gx, gy] = toDem.forward([x, y]);
    const col = Math.floor((gx - originX) / pixelSizeX), row = Math.floor((originY - gy) / pixelSizeY);
    return col >= 0 && col < width && row >= 0 && row < height ? data[row * width + col] : NaN;
  };
}

function basinArea(basin: z.output<typeof basinGeometry>): number {
  const polygons = basin.type === "Polygon" ? [basin.coordinates] : basin.coordinates;
  let area = 0;
  for (const rings of polygons) {
    rings.forEach((r, k) => {
      const a = geodesicRingArea(Float64Array.from(r.flat()));
      area += k === 0 ? a : -a; // later rings are holes (RFC 7946 §3.1.6)
    });
  }
  return area;
}

/** The estimators' planar input: projected coordinates scaled to metres, or WGS 84 lon/lat. */
function planarPolylines(crs: CrsInfo): (lines: Float64Array[]) => Polylines {
  if (crs.geographic) {
    const toLonLat = lonLatTransformer(crs);
    return (lines) => ({
      coordinates: "lonlat",
      lines: lines.map((l) => {
        const out = new Float64Array(l.length);
        for (let i = 0; i < l.length; i += 2) [out[i], out[i + 1]] = toLonLat(l[i], l[i + 1]);
        return out;
      }),
    });
  }
  const k = crs.linearUnitToMetre;
  return (lines) => ({ coordinates: "metres", lines: lines.map((l) => l.map((v) => v * k)) });
}

/** The main stem: from the outlet with the longest main stream, up the longest path to a source (Hack 1957). */
function mainStem(network: StreamNetwork): { path: Float64Array; lengthM: number } {
  const longest = mainStreamLength(network);
  const up = upstreamLinks(network);
  let link = -1;
  network.links.forEach((l, i) => { if (l.downstream < 0 && (link < 0 || longest[i] > longest[link])) link = i; });
  const chain: number[] = [];
  while (link >= 0) {
    chain.push(link);
    let next = -1;
    for (const j of up[link]) if (next < 0 || longest[j] > longest[next] || (longest[j] === longest[next] && j < next)) next = j;
    link = next;
  }
  const out: number[] = [];
  for (let c = chain.length - 1; c >= 0; c--) {
    const path = network.links[chain[c]].path;
    for (let i = out.length === 0 ? 0 : 2; i < path.length; i++) out.push(path[i]);
  }
  return { path: Float64Array.from(out), lengthM: longest[chain[0]] };
}

/** Horton ratios of each connected part: links grouped by the point their outlet link ends at (the
 *  outlet node, which several outlet links share when the outlet is a confluence). */
function componentSummaries(network: StreamNetwork, p: z.output<typeof networkParamsSchema>, toLonLat: (x: number, y: number) => [number, number]): ComponentSummary[] {
  const n = network.links.length;
  const part = new Int32Array(n).fill(-1);
  const partOfEnd = new Map<string, number>();
  const order = topologicalOrder(network);
  for (let k = n - 1; k >= 0; k--) {
    const l = network.links[order[k]];
    if (l.downstream >= 0) { part[l.id] = part[l.downstream]; continue; }
    const key = `${l.path[l.path.length - 2]},${l.path[l.path.length - 1]}`;
    if (!partOfEnd.has(key)) partOfEnd.set(key, partOfEnd.size);
    part[l.id] = partOfEnd.get(key)!;
  }
  const members: number[][] = Array.from({ length: partOfEnd.size }, () => []);
  for (let i = 0; i < n; i++) members[part[i]].push(i);
  const length = members.map((m) => m.reduce((s, i) => s + network.links[i].lengthM, 0));
  const ranked = members.map((_, c) => c).sort((a, b) => length[b] - length[a] || a - b).slice(0, COMPONENTS_LISTED);
  return ranked.map((c) => {
    const index = new Map(members[c].map((i, k) => [i, k]));
    const sub: StreamNetwork = {
      crs: network.crs,
      links: members[c].map((i, k) => ({ ...network.links[i], id: k, downstream: index.get(network.links[i].downstream) ?? -1 })),
    };
    const h = horton(sub, { excludeHighestOrder: p.excludeHighestOrder, confidence: p.confidence });
    const outletLink = sub.links.find((l) => l.downstream < 0)!;
    const [lon, lat] = toLonLat(outletLink.path[outletLink.path.length - 2], outletLink.path[outletLink.path.length - 1]);
    return {
      outlet: { lon: round(lon), lat: round(lat) },
      links: sub.links.length,
      highestOrder: h.highestOrder,
      totalLengthM: length[c],
      bifurcationRatio: h.bifurcation?.value ?? null,
      lengthRatio: h.length?.value ?? null,
    };
  });
}

/** Runs an estimator whose input may be too small; its RangeError becomes the reported reason. */
function attempt<T>(f: () => T): T | { value: null; reason: string } {
  try {
    return f();
  } catch (e) {
    if (e instanceof RangeError) return { value: null, reason: e.message };
    throw e;
  }
}

function ratioSummary(r: HortonRatio | null): RatioSummary | null {
  return r && { value: r.value, ci: r.ci, stdError: r.stdError, rSquared: r.rSquared, ordersUsed: r.ordersUsed, lnValues: r.lnValues };
}

function withoutFit({ fit: _fit, ...rest }: TokunagaResult): Omit<TokunagaResult, "fit"> {
  return rest;
}

function ordersTable(network: StreamNetwork, order: Int32Array, h: HortonResult): NetworkSummary["orders"] {
  const links = new Array<number>(h.highestOrder + 1).fill(0), length = new Array<number>(h.highestOrder + 1).fill(0);
  network.links.forEach((l, i) => { links[order[i]]++; length[order[i]] += l.lengthM; });
  return h.table.map((row) => ({
    order: row.order,
    streams: row.streamCount,
    links: links[row.order],
    meanLengthM: row.meanLengthM,
    totalLengthM: length[row.order],
    meanAreaM2: Number.isFinite(row.meanAreaM2) ? row.meanAreaM2 : null,
    meanSlope: Number.isFinite(row.meanSlope) ? row.meanSlope : null,
  }));
}

function ordersCsv(rows: NetworkSummary["orders"]): string {
  const head = "order,streams,links,mean_length_m,total_length_m,mean_area_m2,mean_slope_m_per_m";
  const cell = (v: number | null) => (v === null ? "" : String(v));
  return [head, ...rows.map((r) => [r.order, r.streams, r.links, r.meanLengthM, r.totalLengthM, r.meanAreaM2, r.meanSlope].map(cell).join(","))].join("\n") + "\n";
}

const round = (v: number) => Number(v.toFixed(LONLAT_DECIMALS));

function networkGeoJson(network: StreamNetwork, order: Int32Array, magnitude: Float64Array, toLonLat: (x: number, y: number) => [number, number], withArea: boolean) {
  return {
    type: "FeatureCollection",
    features: network.links.map((l, i) => {
      const coordinates: [number, number][] = [];
      for (let k = 0; k < l.path.length; k += 2) {
        const [lon, lat] = toLonLat(l.path[k], l.path[k + 1]);
        coordinates.push([round(lon), round(lat)]);
      }
      return {
        type: "Feature",
        id: l.id,
        properties: {
          link: l.id,
          downstream: l.downstream,
          strahler: order[i],
          shreve: magnitude[i],
          lengthM: l.lengthM,
          dropM: Number.isFinite(l.dropM) ? l.dropM : null,
          areaM2: withArea ? l.areaM2 : null,
        },
        geometry: { type: "LineString", coordinates },
      };
    }),
  };
}

function topologyGeoJson(report: TopologyReport) {
  const point = (lon: number, lat: number) => ({ type: "Point", coordinates: [round(lon), round(lat)] });
  return {
    type: "FeatureCollection",
    features: [
      ...report.outlets.map((o) => ({ type: "Feature", properties: { kind: "outlet", rule: o.rule, networkLengthM: o.lengthM, snapDistanceM: o.snapDistanceM }, geometry: point(o.lon, o.lat) })),
      ...report.loops.locations.map((l) => ({ type: "Feature", properties: { kind: "loop-removed", lengthM: l.lengthM }, geometry: point(l.lon, l.lat) })),
    ],
  };
}
