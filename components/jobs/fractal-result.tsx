// The summary of a surface or line dimension job: each estimator's D with its interval and fit quality, and
// the log–log plot of the points it fitted (used points filled, the others hollow) with the fitted line.
import { ScalingPlot } from "@/components/charts/scaling-plot";
import { formatCi, formatNumber } from "@/components/jobs/numbers";
import { DataTable, type Column } from "@/components/ui/data-table";

interface DimensionRow {
  estimator: string;
  D: number;
  se: number;
  ci95: [number, number];
  rSquared: number;
  rangeMinM: number;
  rangeMaxM: number;
  points: number;
}

interface FitEvidence {
  slope: number;
  slopeCi: [number, number];
  intercept: number;
  rSquared: number;
  n: number;
  range: { min: number; max: number; unit: string };
  rangeSource: string;
  rule: string;
  points: { scale: number; measure: number; used: boolean }[];
}

interface EstimatorBlock {
  units?: Record<string, string>;
  fit?: FitEvidence;
  isotropic?: { fit?: FitEvidence };
}

export interface FractalSummary {
  dimensions: DimensionRow[];
  estimators: Record<string, unknown>;
}

/** Title and axes of each estimator's plot; the axes name members of its `units` (JSON object order is not
 *  kept by the store, so it cannot say which unit is the scale). */
const ESTIMATOR_PLOTS: Record<string, { title: string; x: [string, string]; y: [string, string] }> = {
  variogram: { title: "Semivariogram (isotropic)", x: ["lag distance", "distance"], y: ["semivariance", "semivariance"] },
  cubeCounting: { title: "Cube counting", x: ["box side", "boxSide"], y: ["boxes counted", "count"] },
  powerSpectrum: { title: "Power spectrum", x: ["wavelength", "wavelength"], y: ["power", "power"] },
  triangularPrism: { title: "Triangular prism", x: ["square side", "side"], y: ["surface / plan area", "areaRatio"] },
  divider: { title: "Divider (ruler length)", x: ["ruler", "ruler"], y: ["measured length", "length"] },
  boxCounting: { title: "Box counting", x: ["box side", "side"], y: ["boxes counted", "count"] },
};

function axisLabel([name, unitKey]: [string, string], units: Record<string, string> | undefined): string {
  const unit = units?.[unitKey];
  return unit === undefined || unit === "boxes" ? name : `${name} (${unit})`;
}

function plotsOf(estimators: Record<string, unknown>) {
  return Object.entries(ESTIMATOR_PLOTS).flatMap(([key, spec]) => {
    const block = estimators[key] as EstimatorBlock | undefined;
    const fit = block?.fit ?? block?.isotropic?.fit;
    if (block === undefined || fit === undefined || !Array.isArray(fit.points)) return [];
    return [{ key, title: spec.title, fit, x: axisLabel(spec.x, block.units), y: axisLabel(spec.y, block.units) }];
  });
}

const DIMENSION_COLUMNS: Column<DimensionRow>[] = [
  { key: "estimator", header: "Estimator", className: "whitespace-nowrap font-medium", cell: (d) => d.estimator },
  { key: "D", header: "D", className: "font-medium", cell: (d) => formatNumber(d.D, 4) },
  { key: "se", header: "Std. error", cell: (d) => formatNumber(d.se) },
  { key: "ci", header: "95 % CI", className: "whitespace-nowrap", cell: (d) => formatCi(d.ci95, 4) },
  { key: "r2", header: <span className="normal-case">R²</span>, cell: (d) => formatNumber(d.rSquared, 4) },
  {
    key: "range",
    header: <>Scaling range <span className="normal-case">(m)</span></>,
    className: "whitespace-nowrap",
    cell: (d) => `${formatNumber(d.rangeMinM, 4)} – ${formatNumber(d.rangeMaxM, 4)}`,
  },
  { key: "points", header: "Points fitted", cell: (d) => d.points },
];

export function FractalResult({ summary }: { summary: FractalSummary }) {
  const plots = plotsOf(summary.estimators);
  return (
    <div className="flex flex-col gap-5">
      <section aria-labelledby="dimensions-heading" className="flex flex-col gap-3">
        <h2 id="dimensions-heading">Fractal dimension by estimator</h2>
        <DataTable
          label="Dimensions"
          columns={DIMENSION_COLUMNS}
          rows={summary.dimensions}
          rowKey={(d) => d.estimator}
          empty="No estimator gave a dimension."
          utcCaption={false}
        />
        <p className="text-xs text-graphite-muted">D is dimensionless. Each fit is ln(measure) on ln(scale) over the scaling range shown.</p>
      </section>
      {plots.length > 0 && (
        <section aria-labelledby="fits-heading" className="flex flex-col gap-3">
          <h2 id="fits-heading">Log–log fits</h2>
          <div className="grid gap-3 md:grid-cols-2 xl:grid-cols-3">
            {plots.map((p) => (
              <ScalingPlot
                key={p.key}
                title={p.title}
                points={p.fit.points.map((pt) => ({ x: pt.scale, y: pt.measure, used: pt.used }))}
                xLabel={p.x}
                yLabel={p.y}
                line={{ slope: p.fit.slope, intercept: p.fit.intercept, xMin: p.fit.range.min, xMax: p.fit.range.max }}
                note={`slope ${formatNumber(p.fit.slope, 4)} (95 % CI ${formatCi(p.fit.slopeCi, 4)}), R² ${formatNumber(p.fit.rSquared, 4)}; ${p.fit.n} points over ${formatNumber(p.fit.range.min, 4)}–${formatNumber(p.fit.range.max, 4)} ${p.fit.range.unit}, range ${p.fit.rangeSource === "automatic" ? "chosen automatically" : p.fit.rangeSource === "user" ? "given by the parameters" : "all points"}`}
              />
            ))}
          </div>
          {plots[0].fit.rangeSource === "automatic" && (
            <p className="text-xs text-graphite-muted">How an automatic range is chosen: {plots[0].fit.rule}</p>
          )}
        </section>
      )}
    </div>
  );
}
