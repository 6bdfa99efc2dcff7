// Drainage pipeline: a DEM to an ordered stream network and Horton's laws (Horton 1945; Strahler 1957), composing
// Priority-Flood and flat resolution (Barnes et al. 2014), D8 (O'Callaghan & Mark 1984) and the lib/network methods.
//
// Units convention of the summary: every number's unit is in its key as a suffix — M (metres), M2, Km,
// Km2, PerKm (km/km²), S (seconds) — and a key without a suffix is dimensionless (ratios, orders,
// counts, R², t). Timings are not in the summary (it must hash the same on every run) but beside it.
import { mkdtemp } from "node:fs/promises";
import { tmpdir } from "node:os";
import path from "node:path";
import { z } from "zod";
import { readDem, type Dem } from "@/lib/raster/read-geotiff";
import { bandParam, epsgParam, zFactorParam } from "@/lib/pipelines/dem-params";
import { writeGeoTiff } from "@/lib/raster/write-geotiff";
import { lonLatTransformer } from "@/lib/raster/reproject";
import { makeGrid, type Grid } from "@/lib/raster/grid";
import type { CellGeometry } from "@/lib/raster/cell-geometry";
import { conditionAndRoute as conditionDem } from "@/lib/hydro/condition";
import { flowAccumulation } from "@/lib/hydro/flow-accumulation";
import { constantDropThreshold, logSpacedThresholds, type ConstantDropResult } from "@/lib/hydro/constant-drop";
import { networkFromRaster, paintLinks, type RasterNetwork } from "@/lib/network/from-raster";
import { longestFlowPath } from "@/lib/network/flow-length";
import { basinLabels, outletLinksBySize, snapOutlet, subNetwork } from "@/lib/network/basins";
import { strahlerOrder } from "@/lib/network/strahler";
import { shreveMagnitude } from "@/lib/network/shreve";
import { horton, type HortonRatio } from "@/lib/network/horton";
import { networkDimension } from "@/lib/network/dimension";
import { hack } from "@/lib/network/hack";
import { tokunaga } from "@/lib/network/tokunaga";
import { drainageDensity } from "@/lib/network/drainage-density";
import { upstreamLinks, type StreamNetwork } from "@/lib/network/model";
import { M2_PER_KM2 } from "@/lib/network/units";
import { stageClock } from "./stage-clock";

/** decimals of lon/lat in the GeoJSON: 1e-7° is about 1 cm, below any DEM's cell (RFC 7946 §11.2) */
const LONLAT_DECIMALS = 7;
/** basins listed one by one in the summary; "all" can mean thousands of small edge basins */
const BASINS_LISTED = 100;

const areaThreshold = z.object({
  method: z.literal("area"),
  km2: z.number().gt(0).max(1e5).describe("contributing area at which a cell becomes a channel, km²; > 0, ≤ 100000"),
});
const constantDropThresholdParams = z.object({
  method: z.literal("constant-drop"),
  minKm2: z.number().gt(0).max(1e5).default(0.05).describe("smallest candidate threshold, km²; default 0.05"),
  maxKm2: z.number().gt(0).max(1e5).default(5).describe("largest candidate threshold, km²; default 5"),
  candidates: z.number().int().min(2).max(50).default(12).describe("candidate thresholds, evenly spaced in log between min and max; 2–50, default 12"),
  variance: z.enum(["pooled", "welch"]).default("welch").describe("two-sample t-test variance: pooled (Student) or welch (unequal variances); default welch"),
  criticalT: z.number().gt(0).max(10).default(2).describe("the smallest threshold with |t| below this is chosen; default 2"),
});
const basinSelection = z.discriminatedUnion("mode", [
  z.object({ mode: z.literal("all") }).describe("every outlet of the extracted network"),
  z.object({
    mode: z.literal("largest"),
    count: z.number().int().min(1).max(1000).describe("the number of largest basins analysed, 1–1000"),
  }),
  z.object({
    mode: z.literal("outlets"),
    points: z.array(z.object({
      x: z.number().describe("easting (or longitude) in the DEM's CRS units"),
      y: z.number().describe("northing (or latitude) in the DEM's CRS units"),
    })).min(1).max(100).describe("outlet points, 1–100"),
    snapRadiusM: z.number().min(0).max(10_000).default(100).describe("each point moves to the cell of largest contributing area within this distance, m; 0–10000, default 100"),
  }),
]);

export const drainageParamsSchema = z.object({
  channelThreshold: z.discriminatedUnion("method", [areaThreshold, constantDropThresholdParams])
    .default({ method: "area", km2: 1 })
    .describe("how channels are separated from hillslopes: a fixed contributing area, or the constant drop test (Tarboton et al. 1991); default area 1 km²"),
  epsilonFill: z.boolean().default(false).describe("fill depressions with a minimal gradient instead of resolving flats without altering elevations; default false"),
  band: bandParam,
  epsg: epsgParam,
  zFactor: zFactorParam,
  basins: basinSelection.default({ mode: "all" }).describe("which basins the statistics cover; default all"),
  excludeHighestOrder: z.boolean().default(false).describe("leave the highest Strahler order out of the Horton fits; default false"),
  hackMinAreaKm2: z.number().min(0).max(1e5).default(0).describe("fit Hack's law only over sub-basins at least this large, km²; default 0"),
  confidence: z.number().gt(0.5).lt(1).default(0.95).describe("confidence level of every interval; default 0.95"),
});

export type DrainageParams = z.input<typeof drainageParamsSchema>;
type Params = z.output<typeof drainageParamsSchema>;

export interface DrainageArtifact {
  name: string;
  mediaType: string;
  path?: string;
  bytes?: Uint8Array;
}

export type DrainageInput = ({ demPath: string } | { dem: Dem }) & {
  /** where the GeoTIFF artifacts are written; default a new directory under the system's temp dir */
  outDir?: string;
};

export interface DrainageHooks {
  /** `fraction` is of the whole run, 0–1, rising through the stages */
  onProgress?(stage: string, fraction: number): void;
  signal?: AbortSignal;
}

/** Stages and the share of the run at which each starts (rough shares of the time on a 4096² DEM). */
const STAGES = {
  read: 0, fill: 0.1, flats: 0.25, directions: 0.35, accumulation: 0.45, channels: 0.55,
  network: 0.75, analysis: 0.8, artifacts: 0.9,
} as const;
type Stage = keyof typeof STAGES;
type Clock = ReturnType<typeof stageClock<Stage>>;

function ratioSummary(r: HortonRatio | null) {
  if (!r) return null;
  return {
    value: r.value, ci: r.ci, confidence: r.confidence, stdError: r.stdError, lnStdError: r.lnStdError,
    rSquared: r.rSquared, ordersUsed: r.ordersUsed,
  };
}

function constantDropSummary(result: ConstantDropResult) {
  return {
    chosenThresholdKm2: result.chosenThresholdM2 === null ? null : result.chosenThresholdM2 / M2_PER_KM2,
    variance: result.variance,
    criticalT: result.criticalT,
    candidates: result.candidates.map((c) => ({
      thresholdKm2: c.thresholdM2 / M2_PER_KM2, order1Streams: c.order1Streams, higherOrderStreams: c.higherOrderStreams,
      order1MeanDropM: c.order1MeanDropM, higherMeanDropM: c.higherMeanDropM, t: c.t, df: c.df, pValue: c.pValue, passes: c.passes,
    })),
  };
}

function analyse(network: StreamNetwork, params: Params) {
  const h = horton(network, { excludeHighestOrder: params.excludeHighestOrder, confidence: params.confidence });
  const rb = h.bifurcation?.value, rl = h.length?.value;
  let hackSummary = null;
  try {
    const fit = hack(network, { minAreaM2: params.hackMinAreaKm2 * M2_PER_KM2, confidence: params.confidence });
    hackSummary = {
      exponent: fit.exponent, exponentCi: fit.exponentCi, exponentStdError: fit.exponentStdError,
      coefficientKm: fit.coefficientKm, coefficientCi: fit.coefficientCi, rSquared: fit.rSquared,
      confidence: fit.confidence, pointsFitted: fit.pointsFitted, minAreaKm2: fit.minAreaKm2, maxAreaKm2: fit.maxAreaKm2,
      units: "L in km, A in km²",
      lengthMeasuredFrom: "the divide (longest D8 flow path)",
    };
  } catch (err) {
    if (!(err instanceof RangeError)) throw err; // too few sub-basins: reported as null
  }
  const t = tokunaga(network, { confidence: params.confidence });
  const density = drainageDensity(network);
  return {
    horton: {
      highestOrder: h.highestOrder,
      ordersUsed: h.ordersUsed,
      table: h.table.map((r) => ({ order: r.order, streamCount: r.streamCount, meanLengthM: r.meanLengthM, meanAreaKm2: r.meanAreaM2 / M2_PER_KM2, meanSlope: Number.isFinite(r.meanSlope) ? r.meanSlope : null })),
      bifurcationRatio: ratioSummary(h.bifurcation),
      lengthRatio: ratioSummary(h.length),
      areaRatio: ratioSummary(h.area),
      slopeRatio: ratioSummary(h.slope),
    },
    dimension: rb !== undefined && rl !== undefined && rl > 1 && rb > 0 ? (({ raw, bounded, clamped }) => ({ raw, bounded, clamped }))(networkDimension(rb, rl)) : null,
    hack: hackSummary,
    tokunaga: { a: t.a, c: t.c, aCi: t.aCi, cCi: t.cCi, rSquared: t.rSquared, kUsed: t.kUsed, tk: t.tk },
    drainageDensity: { valuePerKm: density.valuePerKm, totalLengthKm: density.totalLengthKm, basinAreaKm2: density.basinAreaKm2 },
  };
}

function roundLonLat(v: number): number {
  return Number(v.toFixed(LONLAT_DECIMALS));
}

/** Stream links as an RFC 7946 FeatureCollection in lon/lat. */
function streamsGeoJson(network: StreamNetwork, order: Int32Array, magnitude: Float64Array, toLonLat: (x: number, y: number) => [number, number]): Uint8Array {
  const features = network.links.map((l) => {
    const coordinates: [number, number][] = [];
    for (let v = 0; v < l.path.length; v += 2) {
      const [lon, lat] = toLonLat(l.path[v], l.path[v + 1]);
      coordinates.push([roundLonLat(lon), roundLonLat(lat)]);
    }
    if (coordinates.length === 1) coordinates.push(coordinates[0]); // a one-cell link: a LineString needs 2 positions
    return {
      type: "Feature",
      id: l.id,
      geometry: { type: "LineString", coordinates },
      properties: {
        id: l.id, downstream: l.downstream, order: order[l.id], magnitude: magnitude[l.id],
        lengthM: l.lengthM, mainStreamLengthM: l.mainStreamLengthM ?? null, dropM: l.dropM, areaM2: l.areaM2, slope: l.lengthM > 0 ? l.dropM / l.lengthM : null,
      },
    };
  });
  return new TextEncoder().encode(JSON.stringify({ type: "FeatureCollection", features }));
}

/** Depression filling, flats and D8 (lib/hydro/condition.ts: two threads); the filled DEM is a copy. */
async function conditionAndRoute(elevation: Grid<Float32Array>, cellGeometry: CellGeometry, params: Params, clock: Clock, signal?: AbortSignal) {
  const routed = await conditionDem(elevation, cellGeometry, {
    epsilon: params.epsilonFill, signal, onStage: clock.stage, onFillProgress: (f) => clock.within("fill", f),
  });
  const { fill, flats } = routed;
  return {
    z: routed.dem,
    directions: routed.directions,
    donors: routed.donors,
    spare: routed.spare,
    conditioning: {
      method: params.epsilonFill ? "priority-flood-epsilon" : "priority-flood-with-flat-resolution",
      cellsRaised: fill.cellsRaised, maxRaiseM: fill.maxRaise,
      flatCells: flats?.flatCells ?? 0, flats: flats?.flats ?? 0, unresolvedFlats: flats?.unresolvedFlats ?? 0,
    },
  };
}

/** Contributing areas and flow lengths; the cell counts and the topological order (8 bytes a cell, in
 *  the conditioning's spare arrays when there are some) are dropped on return, as nothing after needs them. */
function accumulate(
  directions: Grid<Uint8Array>, donors: Uint8Array, spare: [Int32Array, Int32Array] | null, z: Grid<Float32Array>, cellGeometry: CellGeometry,
  clock: Clock, signal?: AbortSignal,
) {
  const onProgress = (f: number) => clock.within("accumulation", f);
  const acc = flowAccumulation(directions, z, cellGeometry, { signal, donors, reuse: spare ?? undefined, onProgress });
  const flowLengthM = longestFlowPath(directions, acc.order, cellGeometry, signal);
  return { areaM2: acc.areaM2, flowLengthM, validCells: acc.validCells, outletCells: acc.outlets };
}

/** DEM → summary (deterministic, units in keys) + artifacts (streams GeoJSON; accumulation, Strahler order and basin GeoTIFFs). */
export async function runDrainage(input: DrainageInput, rawParams: DrainageParams, hooks: DrainageHooks = {}) {
  const params = drainageParamsSchema.parse(rawParams);
  const { signal } = hooks;
  const clock = stageClock<Stage>(STAGES, hooks);
  const { timingsS } = clock, stage = clock.stage;

  stage("read");
  const dem = "dem" in input ? input.dem : await readDem(input.demPath, { band: params.band, epsg: params.epsg, zFactor: params.zFactor, signal });
  const { width, height } = dem.elevation;
  const { cellGeometry, georef } = dem;
  const n = width * height;
  // conditioning works on a copy (the caller's elevations stay as they were); a DEM read here lets its
  // unfilled elevations go, as nothing after needs them
  const conditioned = await conditionAndRoute(dem.elevation, cellGeometry, params, clock, signal);
  const { z, directions, donors, conditioning } = conditioned;
  if (!("dem" in input)) dem.elevation = z;
  stage("accumulation");
  const acc = accumulate(directions, donors, conditioned.spare, z, cellGeometry, clock, signal);
  conditioned.spare = null; // now the cell counts and the order, which nothing after needs
  const flowLengthM = acc.flowLengthM;

  stage("channels");
  const base = { directions, areaM2: acc.areaM2, elevation: z.data, flowLengthM, cellGeometry, transform: georef.transform, crs: georef.crs.proj4, signal };
  let thresholdM2: number;
  let constantDrop: ReturnType<typeof constantDropSummary> | null = null;
  const ct = params.channelThreshold;
  if (ct.method === "area") {
    thresholdM2 = ct.km2 * M2_PER_KM2;
  } else {
    if (!(ct.maxKm2 > ct.minKm2)) throw new RangeError(`maxKm2 (${ct.maxKm2}) must exceed minKm2 (${ct.minKm2})`);
    const thresholds = logSpacedThresholds(ct.minKm2 * M2_PER_KM2, ct.maxKm2 * M2_PER_KM2, ct.candidates);
    let done = 0;
    const result = constantDropThreshold((t) => {
      clock.within("channels", done++ / thresholds.length);
      return networkFromRaster({ ...base, thresholdM2: t }).network;
    }, { thresholdsM2: thresholds, variance: ct.variance, criticalT: ct.criticalT, signal });
    constantDrop = constantDropSummary(result);
    if (result.chosenThresholdM2 === null) {
      throw new RangeError(`no candidate threshold between ${ct.minKm2} and ${ct.maxKm2} km² passes the constant drop test (|t| < ${ct.criticalT}); widen the range`);
    }
    thresholdM2 = result.chosenThresholdM2;
  }

  stage("network");
  const sel = params.basins;
  const snapped = sel.mode === "outlets"
    ? sel.points.map((p) => snapOutlet(acc.areaM2, width, height, georef.transform, cellGeometry, p.x, p.y, sel.snapRadiusM))
    : null;
  const raster: RasterNetwork = networkFromRaster({ ...base, thresholdM2, breakCells: snapped ? Int32Array.from(new Set(snapped)).sort() : undefined });
  const full = raster.network;
  if (full.links.length === 0) throw new RangeError(`no cell drains ${thresholdM2 / M2_PER_KM2} km² or more: lower the channel threshold`);

  // outlet cells of the chosen basins (one label each) and the links that end at them
  let outletCells: number[];
  let outletLinks: number[];
  if (snapped) {
    outletCells = [...new Set(snapped)]; // two points may snap to one cell: one basin
    const wanted = new Set(snapped);
    outletLinks = full.links.filter((l) => wanted.has(raster.endCell[l.id])).map((l) => l.id);
  } else {
    const bySize = outletLinksBySize(full);
    outletLinks = sel.mode === "largest" ? bySize.slice(0, sel.count) : bySize;
    outletCells = outletLinks.map((id) => raster.endCell[id]);
  }
  const labels = basinLabels(directions, outletCells, signal);
  // cut the network below the chosen outlets, then keep what drains to them
  const outletSet = new Set(outletLinks);
  const cut: StreamNetwork = { crs: full.crs, links: full.links.map((l) => (outletSet.has(l.id) && l.downstream >= 0 ? { ...l, downstream: -1 } : l)) };
  const { network, originalId } = subNetwork(cut, outletLinks);
  if (network.links.length === 0) throw new RangeError("no channel drains to the chosen outlets at this threshold");

  stage("analysis");
  const order = strahlerOrder(network);
  const magnitude = shreveMagnitude(network);
  const stats = analyse(network, params);

  stage("artifacts");
  const outDir = input.outDir ?? (await mkdtemp(path.join(tmpdir(), "rillscale-drainage-")));
  const orderGrid = new Uint8Array(n);
  const fullOrder = new Float64Array(full.links.length);
  originalId.forEach((orig, i) => { fullOrder[orig] = order[i]; });
  paintLinks(raster, directions, fullOrder, orderGrid);
  for (let i = 0; i < n; i++) if (z.data[i] !== z.data[i]) acc.areaM2[i] = NaN; // nodata stays nodata in the file
  const files = [
    { name: "flow-accumulation.tif", grid: makeGrid(acc.areaM2, width, height), nodata: NaN },
    { name: "strahler-order.tif", grid: makeGrid(orderGrid, width, height), nodata: 0 },
    { name: "basins.tif", grid: makeGrid(labels, width, height), nodata: 0 },
  ];
  const artifacts: DrainageArtifact[] = [{
    name: "streams.geojson", mediaType: "application/geo+json",
    bytes: streamsGeoJson(network, order, magnitude, lonLatTransformer(georef.crs)),
  }];
  for (const f of files) {
    const filePath = path.join(/*turbopackIgnore: true*/ outDir, f.name); // a runtime folder: not for Next's build to trace
    await writeGeoTiff(filePath, f.grid, georef, { nodata: f.nodata });
    artifacts.push({ name: f.name, mediaType: "image/tiff; application=geotiff", path: filePath });
  }
  clock.done();

  const basinArea = (c: number) => acc.areaM2[c] / M2_PER_KM2;
  const summary = {
    kind: "drainage" as const,
    params,
    input: {
      width, height, validCells: acc.validCells,
      crs: { epsg: georef.crs.epsg, name: georef.crs.name, geographic: georef.crs.geographic },
      cellSizeM: dem.info.cellSizeM,
      bboxLonLat: dem.info.bboxLonLat,
    },
    conditioning: { ...conditioning, outletCells: acc.outletCells },
    channels: {
      method: ct.method, thresholdKm2: thresholdM2 / M2_PER_KM2,
      constantDrop,
    },
    network: {
      links: network.links.length,
      sources: upstreamLinks(network).filter((u) => u.length === 0).length,
      outlets: network.links.filter((l) => l.downstream < 0).length,
      linksInGrid: full.links.length,
      dropsFrom: "depression-filled DEM",
    },
    basins: {
      mode: sel.mode,
      count: outletCells.length,
      /** the first BASINS_LISTED, largest first unless the user gave the outlets */
      list: outletCells.slice(0, BASINS_LISTED).map((c, i) => ({
        label: i + 1, outletCol: c % width, outletRow: Math.floor(c / width), areaKm2: basinArea(c),
      })),
    },
    ...stats,
  };
  return { summary, artifacts, timingsS };
}

export type DrainageSummary = Awaited<ReturnType<typeof runDrainage>>["summary"];
