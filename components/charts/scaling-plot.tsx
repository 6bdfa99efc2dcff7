// A scaling plot as inline SVG: measured points on log axes (or a linear x for per-order plots), the points a fit
// used filled and the others hollow, and the fitted line over the range it was fitted on. Small and static, so
// no chart library: the data are at most a few dozen points.
import { useId } from "react";

export interface PlotPoint {
  x: number;
  y: number;
  used: boolean;
}

/** ln y = intercept + slope · (ln x on a log axis, x on a linear one), drawn from xMin to xMax. */
export interface PlotLine {
  slope: number;
  intercept: number;
  xMin: number;
  xMax: number;
}

export interface ScalingPlotProps {
  title: string;
  points: readonly PlotPoint[];
  xLabel: string;
  yLabel: string;
  xAxis?: "log" | "linear";
  line?: PlotLine;
  /** a sentence under the plot: slope, range, what was fitted */
  note?: string;
}

const WIDTH = 360;
const HEIGHT = 240;
const MARGIN = { left: 52, right: 12, top: 10, bottom: 38 };
const PLOT_W = WIDTH - MARGIN.left - MARGIN.right;
const PLOT_H = HEIGHT - MARGIN.top - MARGIN.bottom;
/** Ticks on a log axis spanning less than this many decades also get 2× and 5× marks. */
const FEW_DECADES = 2;
/** Labels of a narrow axis get up to this many significant digits, until neighbours differ. */
const MAX_TICK_DIGITS = 6;

interface Axis {
  lo: number;
  hi: number;
  ticks: number[];
  /** significant digits of the tick labels */
  digits: number;
}

function logAxis(values: number[]): Axis {
  let lo = Math.log10(Math.min(...values)), hi = Math.log10(Math.max(...values));
  if (hi - lo < 1e-9) { lo -= 0.5; hi += 0.5; }
  const pad = (hi - lo) * 0.05;
  lo -= pad; hi += pad;
  const ticks: number[] = [];
  const steps = hi - lo < FEW_DECADES ? [1, 2, 5] : [1];
  for (let e = Math.floor(lo); e <= Math.ceil(hi); e++) {
    for (const m of steps) {
      const t = Math.log10(m) + e;
      if (t >= lo && t <= hi) ticks.push(t);
    }
  }
  if (ticks.length >= 2) return { lo, hi, ticks, digits: 2 };
  // a narrow span (an area ratio of 1.00–1.05): evenly spaced inner ticks, labelled finely enough to differ
  const inner = [1, 2, 3, 4].map((k) => lo + ((hi - lo) * k) / 5);
  let digits = 3;
  while (digits < MAX_TICK_DIGITS && new Set(inner.map((t) => formatTick(10 ** t, digits))).size < inner.length) digits++;
  return { lo, hi, ticks: inner, digits };
}

function linearAxis(values: number[]): Axis {
  let lo = Math.min(...values), hi = Math.max(...values);
  if (hi - lo < 1e-9) { lo -= 1; hi += 1; }
  const pad = (hi - lo) * 0.08;
  const ticks: number[] = [];
  for (let t = Math.ceil(lo); t <= Math.floor(hi); t++) ticks.push(t);
  return { lo: lo - pad, hi: hi + pad, ticks, digits: 2 };
}

function formatTick(v: number, digits: number): string {
  if (v === 0) return "0";
  const a = Math.abs(v);
  if (a >= 1e6 || a < 1e-2) return v.toExponential(digits - 2).replace("e+", "e");
  return Number(v.toPrecision(digits)).toLocaleString("en");
}

export function ScalingPlot({ title, points, xLabel, yLabel, xAxis = "log", line, note }: ScalingPlotProps) {
  // an id usable inside url(#…) without escaping
  const clipId = `plot-clip-${useId().replace(/[^A-Za-z0-9_-]/g, "")}`;
  const shown = points.filter((p) => p.y > 0 && Number.isFinite(p.y) && Number.isFinite(p.x) && (xAxis === "linear" || p.x > 0));
  if (shown.length === 0) {
    return (
      <figure className="card p-3">
        <figcaption className="text-dense font-medium">{title}</figcaption>
        <p className="mt-2 text-xs text-graphite-muted">No point can be drawn on log axes.</p>
      </figure>
    );
  }
  const xs = xAxis === "log" ? logAxis(shown.map((p) => p.x)) : linearAxis(shown.map((p) => p.x));
  const ys = logAxis(shown.map((p) => p.y));
  const xPos = (v: number) => MARGIN.left + ((v - xs.lo) / (xs.hi - xs.lo)) * PLOT_W;
  const yPos = (v: number) => MARGIN.top + PLOT_H - ((v - ys.lo) / (ys.hi - ys.lo)) * PLOT_H;
  const xValue = (x: number) => (xAxis === "log" ? Math.log10(x) : x);
  const used = shown.filter((p) => p.used).length;

  let fitted: { x1: number; y1: number; x2: number; y2: number } | null = null;
  if (line !== undefined) {
    const lnX = (x: number) => (xAxis === "log" ? Math.log(x) : x);
    const y10 = (x: number) => (line.intercept + line.slope * lnX(x)) / Math.LN10;
    fitted = { x1: xPos(xValue(line.xMin)), y1: yPos(y10(line.xMin)), x2: xPos(xValue(line.xMax)), y2: yPos(y10(line.xMax)) };
  }

  return (
    <figure className="card p-3">
      <figcaption className="text-dense font-medium">{title}</figcaption>
      <svg
        viewBox={`0 0 ${WIDTH} ${HEIGHT}`}
        className="mt-1 w-full max-w-[30rem] text-graphite"
        role="img"
        aria-label={`${title}: ${shown.length} points, ${used} used by the fit; ${yLabel} against ${xLabel}`}
      >
        <defs>
          <clipPath id={clipId}>
            <rect x={MARGIN.left} y={MARGIN.top} width={PLOT_W} height={PLOT_H} />
          </clipPath>
        </defs>
        <rect x={MARGIN.left} y={MARGIN.top} width={PLOT_W} height={PLOT_H} className="fill-white stroke-paper-edge" />
        {xs.ticks.map((t) => (
          <g key={`x${t}`}>
            <line x1={xPos(t)} x2={xPos(t)} y1={MARGIN.top} y2={MARGIN.top + PLOT_H} className="stroke-paper-line" />
            <text x={xPos(t)} y={MARGIN.top + PLOT_H + 13} textAnchor="middle" fontSize="9" className="fill-graphite-muted">
              {formatTick(xAxis === "log" ? 10 ** t : t, xs.digits)}
            </text>
          </g>
        ))}
        {ys.ticks.map((t) => (
          <g key={`y${t}`}>
            <line x1={MARGIN.left} x2={MARGIN.left + PLOT_W} y1={yPos(t)} y2={yPos(t)} className="stroke-paper-line" />
            <text x={MARGIN.left - 4} y={yPos(t) + 3} textAnchor="end" fontSize="9" className="fill-graphite-muted">
              {formatTick(10 ** t, ys.digits)}
            </text>
          </g>
        ))}
        <text x={MARGIN.left + PLOT_W / 2} y={HEIGHT - 6} textAnchor="middle" fontSize="10" className="fill-graphite-soft">
          {xLabel}
        </text>
        <text
          x={12}
          y={MARGIN.top + PLOT_H / 2}
          textAnchor="middle"
          fontSize="10"
          className="fill-graphite-soft"
          transform={`rotate(-90 12 ${MARGIN.top + PLOT_H / 2})`}
        >
          {yLabel}
        </text>
        <g clipPath={`url(#${clipId})`}>
          {fitted !== null && (
            <line {...fitted} className="stroke-lichen-deep" strokeWidth="1.5" strokeDasharray="5 3" />
          )}
          {shown.map((p, i) => (
            <circle
              key={i}
              cx={xPos(xValue(p.x))}
              cy={yPos(Math.log10(p.y))}
              r={3.2}
              className={p.used ? "fill-lichen stroke-lichen-night" : "fill-white stroke-graphite-faint"}
              strokeWidth="1.2"
            />
          ))}
        </g>
      </svg>
      <p className="mt-1 flex flex-wrap items-center gap-x-3 gap-y-0.5 text-xs text-graphite-muted">
        <span className="inline-flex items-center gap-1">
          <svg width="9" height="9" aria-hidden="true"><circle cx="4.5" cy="4.5" r="3.5" className="fill-lichen stroke-lichen-night" /></svg>
          used in the fit ({used})
        </span>
        <span className="inline-flex items-center gap-1">
          <svg width="9" height="9" aria-hidden="true"><circle cx="4.5" cy="4.5" r="3.5" className="fill-white stroke-graphite-faint" /></svg>
          not used ({shown.length - used})
        </span>
        {fitted !== null && (
          <span className="inline-flex items-center gap-1">
            <svg width="16" height="9" aria-hidden="true"><line x1="0" y1="4.5" x2="16" y2="4.5" className="stroke-lichen-deep" strokeWidth="1.5" strokeDasharray="5 3" /></svg>
            fit
          </span>
        )}
      </p>
      {note !== undefined && <p className="mt-1 text-xs text-graphite-muted">{note}</p>}
    </figure>
  );
}
