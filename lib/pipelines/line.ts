// Line pipeline: the fractal dimension of mapped lines (coasts, rivers, frontiers) by the divider method
// (Richardson 1961; Mandelbrot 1967) and by box counting, each with its log–log evidence.
//
// The summary is deterministic (no timings; those are returned beside it). Scales are metres (projected lines
// are converted by their CRS unit; lon/lat lines are measured geodesically on WGS84).
import { z } from "zod";
import { readGeoJson } from "@/lib/vector/read-geojson";
import { resolveLinesCrs } from "@/lib/vector/resolve-crs";
import type { LogLogFit } from "@/lib/fractal/loglog-fit";
import { divider, DEFAULT_RULER_COUNT } from "@/lib/fractal/divider";
import { boxCountLines } from "@/lib/fractal/box-counting";
import { checkPolylines, pointDistance, type Polylines } from "@/lib/fractal/polylines";
import { stageClock } from "./stage-clock";

const ESTIMATORS = ["divider", "box-counting"] as const;

const metreRange = (what: string) => z.object({
  minM: z.number().gt(0).describe(`smallest ${what}, m; > 0`),
  maxM: z.number().gt(0).describe(`largest ${what}, m; > minM`),
}).refine((r) => r.maxM > r.minM, "maxM must exceed minM");

export const lineParamsSchema = z.object({
  estimators: z.array(z.enum(ESTIMATORS)).min(1).default([...ESTIMATORS])
    .describe(`which estimators run: ${ESTIMATORS.join(", ")}; default both`),
  rulers: metreRange("ruler").optional()
    .describe("divider ruler range, m; default from the median segment length to a quarter of the total length"),
  rulerCount: z.number().int().min(3).max(100).default(DEFAULT_RULER_COUNT)
    .describe(`divider rulers, log-spaced over the ruler range; 3–100, default ${DEFAULT_RULER_COUNT}`),
  boxSides: metreRange("box side").optional()
    .describe("box-counting sides, m: doubling from minM while ≤ maxM; default doubling from the median segment length while 4 boxes span the extent"),
  scalingRange: metreRange("scale fitted").optional()
    .describe("user scaling range in metres for both fits; default: the automatic rule of lib/fractal/loglog-fit"),
  epsg: z.number().int().min(1024).max(32767).optional()
    .describe("EPSG code of the lines' CRS, overriding the file's (GeoJSON is lon/lat WGS 84 by RFC 7946)"),
});

export type LineParams = z.input<typeof lineParamsSchema>;
type Params = z.output<typeof lineParamsSchema>;

export type LineInput = { geojson: unknown } | { lines: Polylines };

export interface LineHooks {
  onProgress?(stage: string, fraction: number): void;
  signal?: AbortSignal;
}

const STAGES = { read: 0, divider: 0.1, "box-counting": 0.8 } as const;
type Stage = keyof typeof STAGES;

function fitSummary(fit: LogLogFit) {
  return {
    slope: fit.slope, slopeSe: fit.slopeSe, slopeCi: fit.slopeCi, intercept: fit.intercept, rSquared: fit.rSquared,
    n: fit.n, maxAbsResidual: fit.maxAbsResidual, range: fit.range, rangeSource: fit.rangeSource, rule: fit.rule,
    criterionMet: fit.criterionMet, breaks: fit.breaks, points: fit.points,
  };
}

/** GeoJSON (RFC 7946 lines, or lines in a stated CRS) → plain polylines in lon/lat or metres. */
function polylinesFromGeoJson(doc: unknown, epsg: number | undefined): { lines: Polylines; crs: { epsg: number | null; name: string } } {
  const vector = readGeoJson(doc);
  const crs = resolveLinesCrs(vector.crs, vector.lines, epsg);
  if (crs.geographic) return { lines: { lines: vector.lines, coordinates: "lonlat" }, crs: { epsg: crs.epsg, name: crs.name } };
  const k = crs.linearUnitToMetre;
  const lines = k === 1 ? vector.lines : vector.lines.map((l) => l.map((v) => v * k));
  return { lines: { lines, coordinates: "metres" }, crs: { epsg: crs.epsg, name: crs.name } };
}

/** Lines → summary (deterministic) + timings. */
export async function runLine(input: LineInput, rawParams: LineParams, hooks: LineHooks = {}) {
  const params: Params = lineParamsSchema.parse(rawParams);
  const clock = stageClock<Stage>(STAGES, hooks);
  const { timingsS } = clock, stage = clock.stage;
  stage("read");
  const { lines, crs } = "geojson" in input ? polylinesFromGeoJson(input.geojson, params.epsg)
    : { lines: input.lines, crs: null };
  checkPolylines(lines);
  const dist = pointDistance(lines.coordinates);
  let vertices = 0, totalLength = 0;
  for (const l of lines.lines) {
    vertices += l.length / 2;
    for (let i = 2; i < l.length; i += 2) totalLength += dist(l[i - 2], l[i - 1], l[i], l[i + 1]);
  }
  const range = params.scalingRange ? { min: params.scalingRange.minM, max: params.scalingRange.maxM } : undefined;
  const run = new Set(params.estimators);
  const estimators: Record<string, unknown> = {};
  const dimensions: { estimator: string; D: number; se: number; ci95: [number, number]; rSquared: number; rangeMinM: number; rangeMaxM: number; points: number }[] = [];
  if (run.has("divider")) {
    stage("divider");
    const r = params.rulers, count = params.rulerCount;
    const rulers = r ? Array.from({ length: count }, (_, i) => r.minM * (r.maxM / r.minM) ** (i / (count - 1))) : undefined;
    const d = divider(lines, { rulers, range });
    estimators.divider = {
      method: d.method, units: d.units, coordinates: d.coordinates, leftoverRule: d.leftoverRule,
      rulersM: d.rulers, steps: d.steps, leftover: d.leftover, lengthM: d.length, fit: fitSummary(d.fit), dimension: d.dimension,
    };
    dimensions.push({ estimator: "divider", D: d.dimension.value, se: d.dimension.se, ci95: d.dimension.ci, rSquared: d.fit.rSquared, rangeMinM: d.fit.range.min, rangeMaxM: d.fit.range.max, points: d.fit.n });
  }
  if (run.has("box-counting")) {
    stage("box-counting");
    const b = params.boxSides;
    let sides: number[] | undefined;
    if (b) { sides = []; for (let v = b.minM; v <= b.maxM; v *= 2) sides.push(v); }
    const c = boxCountLines(lines, { sides, range });
    estimators.boxCounting = {
      method: c.method, units: c.units, projection: c.projection ?? null, sidesM: c.sides, counts: c.counts,
      fit: fitSummary(c.fit), dimension: c.dimension,
    };
    dimensions.push({ estimator: "box counting", D: c.dimension.value, se: c.dimension.se, ci95: c.dimension.ci, rSquared: c.fit.rSquared, rangeMinM: c.fit.range.min, rangeMaxM: c.fit.range.max, points: c.fit.n });
  }
  clock.done();
  const summary = {
    kind: "line" as const,
    params,
    input: { lines: lines.lines.length, vertices, coordinates: lines.coordinates, crs, totalLengthM: totalLength },
    dimensions,
    estimators,
  };
  return { summary, timingsS };
}
