// The summary of a surface or line dimension job: each estimator's D with its interval and fit quality, and
// the log–log plot of the points it fitted (used points filled, the others hollow) with the fitted line.
import { ScalingPlot } from "@/components/charts/scaling-plot";
import { formatCi, formatNumber } from "@/components/jobs/numbers";

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

const ESTIMATOR_TITLES: Record<string, string> = {
  variogram: "Semivariogram (isotropic)",
  cubeCounting: "Cube counting",
  powerSpectrum: "Power spectrum",
  triangularPrism: "Triangular prism",
  divider: "Divider (ruler length)",
  boxCounting: "Box counting",
};

/** The axes from an estimator's own units: its first unit is the scale, its second the measure. */
function axes(units: Record<string, string> | undefined): { x: string; y: string } {
  const entries = Object.entries(units ?? {}).filter(([k]) => k !== "dimension");
  const label = (e: [string, string] | undefined, fallback: string) => (e === undefined ? fallback : `${e[0]} (${e[1]})`);
  return { x: label(entries[0], "scale"), y: label(entries[1], "measure") };
}

function plotsOf(estimators: Record<string, unknown>) {
  return Object.entries(estimators).flatMap(([key, raw]) => {
    const block = raw as EstimatorBlock;
    const fit = block.fit ?? block.isotropic?.fit;
    if (fit === undefined || !Array.isArray(fit.points)) return [];
    return [{ key, title: ESTIMATOR_TITLES[key] ?? key, fit, ...axes(block.units) }];
  });
}

export function FractalResult({ summary }: { summary: FractalSummary }) {
  const plots = plotsOf(summary.estimators);
  return (
    <div className="flex flex-col gap-5">
      <section aria-labelledby="dimensions-heading" className="flex flex-col gap-3">
        <h2 id="dimensions-heading">Fractal dimension by estimator</h2>
        <div className="card overflow-x-auto">
          <table className="table-dense" aria-label="Dimensions">
            <thead>
              <tr>
                <th scope="col">Estimator</th>
                <th scope="col">D</th>
                <th scope="col">Std. error</th>
                <th scope="col">95 % CI</th>
                <th scope="col"><span className="normal-case">R²</span></th>
                <th scope="col">Scaling range <span className="normal-case">(m)</span></th>
                <th scope="col">Points fitted</th>
              </tr>
            </thead>
            <tbody>
              {summary.dimensions.length === 0 && (
                <tr>
                  <td colSpan={7} className="py-4 text-center text-graphite-muted">No estimator gave a dimension.</td>
                </tr>
              )}
              {summary.dimensions.map((d) => (
                <tr key={d.estimator}>
                  <td className="whitespace-nowrap font-medium">{d.estimator}</td>
                  <td className="font-medium">{formatNumber(d.D, 4)}</td>
                  <td>{formatNumber(d.se)}</td>
                  <td className="whitespace-nowrap">{formatCi(d.ci95, 4)}</td>
                  <td>{formatNumber(d.rSquared, 4)}</td>
                  <td className="whitespace-nowrap">{formatNumber(d.rangeMinM, 4)} – {formatNumber(d.rangeMaxM, 4)}</td>
                  <td>{d.points}</td>
                </tr>
              ))}
            </tbody>
          </table>
        </div>
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
                note={`slope ${formatNumber(p.fit.slope, 4)} (95 % CI ${formatCi(p.fit.slopeCi, 4)}), R² ${formatNumber(p.fit.rSquared, 4)}, ${p.fit.n} points over ${formatNumber(p.fit.range.min, 4)}–${formatNumber(p.fit.range.max, 4)} ${p.fit.range.unit} (${p.fit.rangeSource}: ${p.fit.rule})`}
              />
            ))}
          </div>
        </section>
      )}
    </div>
  );
}
