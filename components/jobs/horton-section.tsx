// Horton's laws as the job page shows them, for a network from a DEM (drainage) or from mapped lines (network):
// the ratios with their intervals, the per-order table, and the per-order plots with the fitted lines.
import { ScalingPlot, type PlotLine } from "@/components/charts/scaling-plot";
import { formatCi, formatNumber } from "@/components/jobs/numbers";
import { DataTable, type Column } from "@/components/ui/data-table";

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

type Ratio = (typeof RATIOS)[number];
const R2 = <span className="normal-case">R²</span>;

function ratioColumns(ratios: Record<Ratio["key"], RatioEvidence | null>, level: string): Column<Ratio>[] {
  const of = (r: Ratio) => ratios[r.key];
  return [
    {
      key: "ratio",
      header: "Ratio",
      className: "whitespace-nowrap",
      cell: (r) => (
        <>
          <span className="font-medium">{r.symbol}</span> <span className="text-graphite-muted">{r.name}</span>
        </>
      ),
    },
    { key: "value", header: "Value", className: "font-medium", cell: (r) => <span data-ratio={r.key}>{of(r) === null ? "—" : formatNumber(of(r)!.value, 4)}</span> },
    { key: "ci", header: level, className: "whitespace-nowrap", cell: (r) => (of(r) === null ? "—" : formatCi(of(r)!.ci)) },
    { key: "se", header: "Std. error", cell: (r) => (of(r) === null ? "—" : formatNumber(of(r)!.stdError)) },
    { key: "r2", header: R2, cell: (r) => (of(r) === null ? "—" : formatNumber(of(r)!.rSquared, 4)) },
    { key: "orders", header: "Orders fitted", cell: (r) => (of(r) === null ? "too few orders" : of(r)!.ordersUsed.join(", ")) },
    { key: "law", header: "Law", className: "whitespace-nowrap text-graphite-muted", cell: (r) => r.law },
  ];
}

const ORDER_COLUMNS: Column<OrderRow>[] = [
  { key: "order", header: <>Strahler order <span className="normal-case">ω</span></>, cell: (r) => r.order },
  { key: "streams", header: <>Streams <span className="normal-case">N<sub>ω</sub></span></>, cell: (r) => r.streams },
  { key: "length", header: <>Mean length <span className="normal-case">(m)</span></>, cell: (r) => formatNumber(r.meanLengthM, 4) },
  { key: "area", header: <>Mean area <span className="normal-case">(km²)</span></>, cell: (r) => (r.meanAreaKm2 === null ? "—" : formatNumber(r.meanAreaKm2, 4)) },
  { key: "slope", header: <>Mean slope <span className="normal-case">(m/m)</span></>, cell: (r) => (r.meanSlope === null ? "—" : formatNumber(r.meanSlope, 3)) },
];

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
      <DataTable label="Horton ratios" columns={ratioColumns(ratios, level)} rows={RATIOS} rowKey={(r) => r.key} utcCaption={false} />
      <DataTable label="Per-order table" columns={ORDER_COLUMNS} rows={rows} rowKey={(r) => String(r.order)} utcCaption={false} />
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
