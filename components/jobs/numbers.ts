// Numbers of a result as the job page prints them: significant digits rather than fixed decimals (values span
// square metres to thousands of square kilometres), and "—" where the pipeline reports none.

export function formatNumber(v: number | null | undefined, digits = 3): string {
  if (v === null || v === undefined || !Number.isFinite(v)) return "—";
  if (v !== 0 && (Math.abs(v) >= 1e6 || Math.abs(v) < 1e-3)) return v.toExponential(digits - 1);
  return Number(v.toPrecision(digits)).toLocaleString("en", { maximumFractionDigits: 12 });
}

export function formatCi(ci: readonly [number, number] | null | undefined, digits = 3): string {
  if (ci === null || ci === undefined) return "—";
  return `${formatNumber(ci[0], digits)} – ${formatNumber(ci[1], digits)}`;
}
