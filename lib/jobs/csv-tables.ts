// CSV (RFC 4180) of result tables: Horton's per-order table and the points of every log–log fit in a summary,
// with units in the column names, for spreadsheet and pandas users.

const cell = (v: unknown): string => {
  if (v === null || v === undefined || (typeof v === "number" && !Number.isFinite(v))) return "";
  const s = String(v);
  return /[",\r\n]/.test(s) ? `"${s.replaceAll('"', '""')}"` : s;
};

const table = (head: string[], rows: unknown[][]) => [head, ...rows].map((r) => r.map(cell).join(",")).join("\r\n") + "\r\n";

export interface HortonRow {
  order: number;
  streamCount: number;
  meanLengthM: number;
  meanAreaKm2: number;
  meanSlope: number | null;
}

export function hortonOrdersCsv(rows: HortonRow[]): string {
  return table(["order", "stream_count", "mean_length_m", "mean_area_km2", "mean_slope_m_per_m"],
    rows.map((r) => [r.order, r.streamCount, r.meanLengthM, r.meanAreaKm2, r.meanSlope]));
}

interface FitLike {
  points: { scale: number; measure: number; used: boolean }[];
  range?: { unit?: string };
}

const isFit = (v: unknown): v is FitLike =>
  typeof v === "object" && v !== null && Array.isArray((v as FitLike).points) &&
  (v as FitLike).points.every((p) => typeof p === "object" && p !== null && "scale" in p && "measure" in p);

/** Every object with `points: [{scale, measure, used}]` in the summary, named by its JSON Pointer; null when none. */
export function fitPointsCsv(summary: unknown): string | null {
  const rows: unknown[][] = [];
  const walk = (v: unknown, at: string, depth: number) => {
    if (depth > 32 || typeof v !== "object" || v === null) return; // summaries are shallow; bound the walk anyway
    if (isFit(v)) {
      for (const p of v.points) rows.push([at, p.scale, p.measure, p.used, v.range?.unit ?? ""]);
      return;
    }
    for (const [k, child] of Object.entries(v)) walk(child, `${at}/${k}`, depth + 1);
  };
  walk(summary, "", 0);
  return rows.length === 0 ? null : table(["fit", "scale", "measure", "used", "scale_unit"], rows);
}
