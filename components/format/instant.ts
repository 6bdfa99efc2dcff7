// One way to print instants in the console: UTC, sortable, the same for every reader. Table cells leave
// the zone out (their column header says UTC) to keep rows narrow.
export function formatInstant(iso: string | null | undefined, withZone = true): string {
  if (iso === null || iso === undefined) return "—";
  const d = new Date(iso);
  if (Number.isNaN(d.getTime())) return iso;
  return `${d.toISOString().slice(0, 16).replace("T", " ")}${withZone ? " UTC" : ""}`;
}

/** The same with seconds, for audit rows where order within a minute matters. */
export function formatInstantPrecise(iso: string, withZone = true): string {
  const d = new Date(iso);
  if (Number.isNaN(d.getTime())) return iso;
  return `${d.toISOString().slice(0, 19).replace("T", " ")}${withZone ? " UTC" : ""}`;
}
