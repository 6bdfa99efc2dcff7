// Horton's laws as the job page shows them, for a network from a DEM (drainage) or from mapped lines (network):
// the ratios with their intervals, the per-order table, and the per-order plots with the fitted lines.
import { ScalingPlot, type PlotLine } from "@/components/charts/scaling-plot";
import { formatCi, formatNumber } from "@/components/jobs/numbers";

export interface RatioEvidence {
  value: number;
  ci: [number, number];
  stdError: number;
  rSquared: number;
  ordersUsed: number[];
  confidence?: number;
}

export interface OrderRow {
  order: number;
  streams: number;
  meanLengthM: number;
  meanAreaKm2: number | null;
  meanSlope: number | null;
}

export interface HortonSectionProps {
  bifurcation: RatioEvidence | null;
  length: RatioEvidence | null;
  area: RatioEvidence | null;
  slope: RatioEvidence | null;
  rows: OrderRow[];
  confidence: number;
}

const RATIOS = [
  { key: "bifurcation", symbol: <>R<sub>B</sub></>, name: "bifurcation ratio", law: <>N<sub>ω</sub> = R<sub>B</sub><sup>Ω−ω</sup></> },
  { key: "length", symbol: <>R<sub>L</sub></>, name: "length ratio", law: <>L̄<sub>ω</sub> = L̄<sub>1</sub> R<sub>L</sub><sup>ω−1</sup></> },
  { key: "area", symbol: <>R<sub>A</sub></>, name: "area ratio", law: <>Ā<sub>ω</sub> = Ā<sub>1</sub> R<sub>A</sub><sup>ω−1</sup></> },
  { key: "slope", symbol: <>R<sub>S</sub></>, name: "slope ratio", law: <>S̄<sub>ω</sub> = S̄<sub>1</sub> R<sub>S</sub><sup>1−ω</sup></> },
] as const;

/** The least-squares line of ln y on ω passes through the mean of the used points; its slope is ±ln R. */
function lineThrough(rows: { x: number; y: number }[], used: number[], slope: number): PlotLine | undefined {
  const pts = rows.filter((r) => used.includes(r.x) && r.y > 0);
  if (pts.length < 2) return undefined;
  const mx = pts.reduce((s, p) => s + p.x, 0) / pts.length;
  const my = pts.reduce((s, p) => s + Math.log(p.y), 0) / pts.length;
  return { slope, intercept: my - slope * mx, xMin: Math.min(...pts.map((p) => p.x)), xMax: Math.max(...pts.map((p) => p.x)) };
}

export function HortonSection({ rows, confidence, ...ratios }: HortonSectionProps) {
  const level = `${Math.round(confidence * 100)} % CI`;
  const plots = [
    { title: "Stream numbers by order", y: "streams", ratio: ratios.bifurcation, sign: -1, value: (r: OrderRow) => r.streams },
    { title: "Mean stream length by order", y: "mean length (m)", ratio: ratios.length, sign: 1, value: (r: OrderRow) => r.meanLengthM },
    { title: "Mean basin area by order", y: "mean area (km²)", ratio: ratios.area, sign: 1, value: (r: OrderRow) => r.meanAreaKm2 ?? NaN },
  ];
  return (
    <section aria-labelledby="horton-heading" className="flex flex-col gap-3">
      <h2 id="horton-heading">Horton&apos;s laws</h2>
      <div className="card overflow-x-auto">
        <table className="table-dense" aria-label="Horton ratios">
          <thead>
            <tr>
              <th scope="col">Ratio</th>
              <th scope="col">Value</th>
              <th scope="col">{level}</th>
              <th scope="col">Std. error</th>
              <th scope="col"><span className="normal-case">R²</span></th>
              <th scope="col">Orders fitted</th>
              <th scope="col">Law</th>
            </tr>
          </thead>
          <tbody>
            {RATIOS.map((r) => {
              const e = ratios[r.key];
              return (
                <tr key={r.key}>
                  <td className="whitespace-nowrap">
                    <span className="font-medium">{r.symbol}</span> <span className="text-graphite-muted">{r.name}</span>
                  </td>
                  <td className="font-medium" data-ratio={r.key}>{e === null ? "—" : formatNumber(e.value, 4)}</td>
                  <td className="whitespace-nowrap">{e === null ? "—" : formatCi(e.ci)}</td>
                  <td>{e === null ? "—" : formatNumber(e.stdError)}</td>
                  <td>{e === null ? "—" : formatNumber(e.rSquared, 4)}</td>
                  <td>{e === null ? "too few orders" : e.ordersUsed.join(", ")}</td>
                  <td className="whitespace-nowrap text-graphite-muted">{r.law}</td>
                </tr>
              );
            })}
          </tbody>
        </table>
      </div>
      <div className="card overflow-x-auto">
        <table className="table-dense" aria-label="Per-order table">
          <thead>
            <tr>
              <th scope="col">Strahler order <span className="normal-case">ω</span></th>
              <th scope="col">Streams <span className="normal-case">N<sub>ω</sub></span></th>
              <th scope="col">Mean length <span className="normal-case">(m)</span></th>
              <th scope="col">Mean area <span className="normal-case">(km²)</span></th>
              <th scope="col">Mean slope <span className="normal-case">(m/m)</span></th>
            </tr>
          </thead>
          <tbody>
            {rows.map((r) => (
              <tr key={r.order}>
                <td>{r.order}</td>
                <td>{r.streams}</td>
                <td>{formatNumber(r.meanLengthM, 4)}</td>
                <td>{r.meanAreaKm2 === null ? "—" : formatNumber(r.meanAreaKm2, 4)}</td>
                <td>{r.meanSlope === null ? "—" : formatNumber(r.meanSlope, 3)}</td>
              </tr>
            ))}
          </tbody>
        </table>
      </div>
      <div className="grid gap-3 md:grid-cols-2 xl:grid-cols-3">
        {plots.map((p) => {
          const points = rows.map((r) => ({ x: r.order, y: p.value(r), used: p.ratio?.ordersUsed.includes(r.order) ?? false }));
          const line = p.ratio === null ? undefined : lineThrough(points, p.ratio.ordersUsed, p.sign * Math.log(p.ratio.value));
          return (
            <ScalingPlot
              key={p.title}
              title={p.title}
              points={points}
              xAxis="linear"
              xLabel="Strahler order ω"
              yLabel={p.y}
              line={line}
            />
          );
        })}
      </div>
    </section>
  );
}
