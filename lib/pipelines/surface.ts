// Surface pipeline: the fractal dimension of a DEM by the semivariogram (Mark & Aronson 1984), differential box
// counting (Sarkar & Chaudhuri 1994), the power spectrum (Huang & Turcotte 1989) and the triangular prism
// (Clarke 1986), with a local dimension map and transect dimensions. Every estimator reports its evidence.
//
// The summary is deterministic (no timings; those are returned beside it). Units: each estimator's block states
// its own (`units`); scales of every fit are metres; dimensions are dimensionless.
import { mkdtemp } from "node:fs/promises";
import { tmpdir } from "node:os";
import path from "node:path";
import { z } from "zod";
import { readDem, type Dem, type Georeference } from "@/lib/raster/read-geotiff";
import { bandParam, epsgParam, zFactorParam } from "@/lib/pipelines/dem-params";
import { writeGeoTiff } from "@/lib/raster/write-geotiff";
import type { Grid } from "@/lib/raster/grid";
import type { CellGeometry } from "@/lib/raster/cell-geometry";
import type { LogLogFit, Derived } from "@/lib/fractal/loglog-fit";
import { variogram, DEFAULT_LAG_COUNT, DEFAULT_MAX_LAG_FRACTION } from "@/lib/fractal/variogram";
import { cubeCounting } from "@/lib/fractal/cube-counting";
import { powerSpectrum, DEFAULT_RADIAL_BINS } from "@/lib/fractal/power-spectrum";
import { triangularPrism } from "@/lib/fractal/triangular-prism";
import { localDimension, DEFAULT_MIN_VALID_FRACTION } from "@/lib/fractal/local-dimension";
import { profileDimension, sampleTransect } from "@/lib/fractal/profile";
import { stageClock } from "./stage-clock";

const ESTIMATORS = ["variogram", "cube-counting", "power-spectrum", "triangular-prism", "local-dimension", "profiles"] as const;

const cellPoint = z.tuple([
  z.number().min(0).describe("column, cells from the west edge (cell centres are integers)"),
  z.number().min(0).describe("row, cells from the north edge"),
]);

export const surfaceParamsSchema = z.object({
  estimators: z.array(z.enum(ESTIMATORS)).min(1).default([...ESTIMATORS])
    .describe(`which estimators run: ${ESTIMATORS.join(", ")}; default all`),
  scalingRange: z.object({
    minM: z.number().gt(0).describe("smallest scale fitted, m; > 0"),
    maxM: z.number().gt(0).describe("largest scale fitted, m; > minM"),
  }).refine((r) => r.maxM > r.minM, "maxM must exceed minM").optional()
    .describe("user scaling range in metres for every fit (lag, box side, wavelength, square side); default: the automatic rule of lib/fractal/loglog-fit"),
  lagCount: z.number().int().min(4).max(64).default(DEFAULT_LAG_COUNT)
    .describe(`semivariogram lags, log-spaced from 1 cell; 4–64, default ${DEFAULT_LAG_COUNT}`),
  maxLagFraction: z.number().gt(0).max(0.5).default(DEFAULT_MAX_LAG_FRACTION)
    .describe(`largest semivariogram lag as a fraction of the shorter grid side; (0, 0.5], default ${DEFAULT_MAX_LAG_FRACTION}`),
  cubeNormalisation: z.enum(["true-units", "grid-extent"]).default("true-units")
    .describe("cube counting box height: true-units (box height = box side in metres) or grid-extent (the elevation range scaled to the grid's width in cells, Sarkar & Chaudhuri's h′ = s·G/M); default true-units"),
  spectrumBins: z.number().int().min(4).max(100).default(DEFAULT_RADIAL_BINS)
    .describe(`log-spaced radial frequency bins of the power spectrum; 4–100, default ${DEFAULT_RADIAL_BINS}`),
  localWindowCells: z.number().int().min(8).max(4096).default(64)
    .describe("local dimension window side, cells; 8–4096, default 64"),
  localStepCells: z.number().int().min(1).max(4096).default(32)
    .describe("distance between local windows and the cell size of the map, in input cells; 1–4096, default 32"),
  localMinValidFraction: z.number().gt(0).max(1).default(DEFAULT_MIN_VALID_FRACTION)
    .describe(`share of valid cells a local window needs, else the map holds nodata; (0, 1], default ${DEFAULT_MIN_VALID_FRACTION}`),
  profiles: z.array(z.object({ from: cellPoint, to: cellPoint })).max(20).optional()
    .describe("transects in cell coordinates, up to 20; default the middle row and the middle column"),
  band: bandParam,
  epsg: epsgParam,
  zFactor: zFactorParam,
});

export type SurfaceParams = z.input<typeof surfaceParamsSchema>;
type Params = z.output<typeof surfaceParamsSchema>;

/** What the estimators need from a DEM; a georeference makes the local dimension map a GeoTIFF. */
export interface SurfaceDem {
  elevation: Grid<Float32Array>;
  cellGeometry: CellGeometry;
  georef?: Georeference;
}

export type SurfaceInput = ({ demPath: string } | { dem: SurfaceDem | Dem }) & {
  /** where the GeoTIFF artifact is written; default a new directory under the system's temp dir */
  outDir?: string;
};

export interface SurfaceHooks {
  /** `fraction` is of the whole run, 0–1, rising through the stages */
  onProgress?(stage: string, fraction: number): void;
  signal?: AbortSignal;
}

export interface SurfaceArtifact { name: string; mediaType: string; path: string }

/** Stages and the share of the run at which each starts (rough shares of the time on a 4096² DEM). */
const STAGES = {
  read: 0, variogram: 0.1, "cube-counting": 0.3, "power-spectrum": 0.35, "triangular-prism": 0.55,
  "local-dimension": 0.65, profiles: 0.9, artifacts: 0.95,
} as const;
type Stage = keyof typeof STAGES;

function fitSummary(fit: LogLogFit) {
  return {
    slope: fit.slope, slopeSe: fit.slopeSe, slopeCi: fit.slopeCi, intercept: fit.intercept, rSquared: fit.rSquared,
    n: fit.n, maxAbsResidual: fit.maxAbsResidual, range: fit.range, rangeSource: fit.rangeSource, rule: fit.rule,
    criterionMet: fit.criterionMet, breaks: fit.breaks, points: fit.points,
  };
}

function row(estimator: string, d: Derived, fit: LogLogFit) {
  return { estimator, D: d.value, se: d.se, ci95: d.ci, rSquared: fit.rSquared, rangeMinM: fit.range.min, rangeMaxM: fit.range.max, points: fit.n };
}

/** DEM → summary (deterministic) + artifacts (the local dimension map GeoTIFF) + timings. */
export async function runSurface(input: SurfaceInput, rawParams: SurfaceParams, hooks: SurfaceHooks = {}) {
  const params: Params = surfaceParamsSchema.parse(rawParams);
  const { signal } = hooks;
  const clock = stageClock<Stage>(STAGES, hooks);
  const { timingsS } = clock, stage = clock.stage;
  stage("read");
  const dem: SurfaceDem = "dem" in input ? input.dem
    : await readDem(input.demPath, { band: params.band, epsg: params.epsg, zFactor: params.zFactor, signal });
  const { elevation: grid, cellGeometry: geometry } = dem;
  const { width, height, data } = grid;
  let valid = 0, zmin = Infinity, zmax = -Infinity;
  for (let i = 0; i < data.length; i++) { const v = data[i]; if (v === v) { valid++; if (v < zmin) zmin = v; if (v > zmax) zmax = v; } }
  if (valid === 0) throw new RangeError("the DEM holds no valid cell");
  const range = params.scalingRange ? { min: params.scalingRange.minM, max: params.scalingRange.maxM } : undefined;
  const run = new Set(params.estimators);
  const estimators: Record<string, unknown> = {};
  const dimensions: ReturnType<typeof row>[] = [];

  if (run.has("variogram")) {
    stage("variogram");
    const v = variogram(grid, geometry, { lagCount: params.lagCount, maxLagFraction: params.maxLagFraction, range });
    const series = (s: typeof v.isotropic) => ({
      lagsCells: s.lags, distanceM: s.distance, semivariance: s.semivariance, pairs: s.pairs,
      fit: fitSummary(s.fit), hurst: s.hurst, dimension: s.dimension,
    });
    estimators.variogram = {
      method: v.method, units: v.units, isotropic: series(v.isotropic),
      directions: v.directions.map((d) => ({ direction: d.direction, ...series(d) })), anisotropy: v.anisotropy,
    };
    dimensions.push(row("variogram", v.isotropic.dimension, v.isotropic.fit));
    for (const d of v.directions) dimensions.push(row(`variogram ${d.direction}`, d.dimension, d.fit));
  }
  if (run.has("cube-counting")) {
    stage("cube-counting");
    const c = cubeCounting(grid, geometry, { normalisation: params.cubeNormalisation, range });
    estimators.cubeCounting = {
      method: c.method, normalisation: c.normalisation, boxHeightPerCell: c.boxHeightPerCell, units: c.units,
      sidesCells: c.sides, sidesM: c.scales, counts: c.counts, fit: fitSummary(c.fit), dimension: c.dimension,
    };
    dimensions.push(row(`cube counting (${c.normalisation})`, c.dimension, c.fit));
  }
  if (run.has("power-spectrum")) {
    stage("power-spectrum");
    const p = powerSpectrum(grid, geometry, { bins: params.spectrumBins, range });
    estimators.powerSpectrum = {
      method: p.method, units: p.units, preparation: p.preparation, fftSize: [p.fftWidth, p.fftHeight],
      wavelengthM: p.wavelength, power: p.power, frequencies: p.frequencies, fit: fitSummary(p.fit), beta: p.beta, dimension: p.dimension,
    };
    dimensions.push(row("power spectrum", p.dimension, p.fit));
  }
  if (run.has("triangular-prism")) {
    stage("triangular-prism");
    const t = triangularPrism(grid, geometry, { range });
    estimators.triangularPrism = {
      method: t.method, units: t.units, stepsCells: t.steps, sidesM: t.scales, areaRatio: t.areaRatio,
      fit: fitSummary(t.fit), dimension: t.dimension,
    };
    dimensions.push(row("triangular prism", t.dimension, t.fit));
  }
  const artifacts: SurfaceArtifact[] = [];
  let localMap: ReturnType<typeof localDimension> | null = null;
  if (run.has("local-dimension")) {
    stage("local-dimension");
    const win = Math.min(params.localWindowCells, width, height);
    localMap = localDimension(grid, geometry, { window: win, step: params.localStepCells, minValidFraction: params.localMinValidFraction },
      (f) => { signal?.throwIfAborted(); clock.within("local-dimension", f); });
    estimators.localDimension = {
      method: localMap.method, units: localMap.units, windowCells: localMap.window, stepCells: localMap.step, lagsCells: localMap.lags,
      mapSize: [localMap.dimension.width, localMap.dimension.height], summary: localMap.summary,
      artifact: dem.georef ? "local-dimension.tif" : null,
    };
  }
  if (run.has("profiles")) {
    stage("profiles");
    const transects = params.profiles ?? [
      { from: [0, Math.floor(height / 2)] as [number, number], to: [width - 1, Math.floor(height / 2)] as [number, number] },
      { from: [Math.floor(width / 2), 0] as [number, number], to: [Math.floor(width / 2), height - 1] as [number, number] },
    ];
    estimators.profiles = transects.map((t) => {
      const s = sampleTransect(grid, geometry, t.from, t.to);
      const p = profileDimension(s.values, s.spacing, { range });
      return {
        fromCell: t.from, toCell: t.to, samples: p.samples, spacingM: p.spacing, units: p.units,
        variogram: { distanceM: p.variogram.distance, semivariance: p.variogram.semivariance, pairs: p.variogram.pairs, fit: fitSummary(p.variogram.fit), hurst: p.variogram.hurst, dimension: p.variogram.dimension },
        spectrum: p.spectrum && { preparation: p.spectrum.preparation, wavelengthM: p.spectrum.wavelength, power: p.spectrum.power, fit: fitSummary(p.spectrum.fit), beta: p.spectrum.beta, dimension: p.spectrum.dimension },
      };
    });
  }
  stage("artifacts");
  if (localMap && dem.georef) {
    const outDir = input.outDir ?? (await mkdtemp(path.join(tmpdir(), "rillscale-surface-")));
    const t = dem.georef.transform, step = localMap.step;
    // the map's cell is step × step input cells from the same origin
    const georef: Georeference = { ...dem.georef, transform: { ...t, pixelSizeX: t.pixelSizeX * step, pixelSizeY: t.pixelSizeY * step } };
    const filePath = path.join(outDir, "local-dimension.tif");
    await writeGeoTiff(filePath, localMap.dimension, georef, { nodata: NaN });
    artifacts.push({ name: "local-dimension.tif", mediaType: "image/tiff; application=geotiff", path: filePath });
  }
  clock.done();
  let dxMean = 0, dyMean = 0;
  for (let r = 0; r < height; r++) { dxMean += geometry.dx[r] / height; dyMean += geometry.dy[r] / height; }
  const summary = {
    kind: "surface" as const,
    params,
    input: {
      width, height, validCells: valid, geographic: geometry.geographic,
      meanCellSizeM: [dxMean, dyMean], elevationRangeM: [zmin, zmax],
      crs: dem.georef ? { epsg: dem.georef.crs.epsg, name: dem.georef.crs.name } : null,
    },
    dimensions,
    estimators,
  };
  return { summary, artifacts, timingsS };
}
