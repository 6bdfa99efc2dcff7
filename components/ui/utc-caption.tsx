// Table cells print instants without a zone to stay narrow; this caption states it once per table.
export function UtcCaption() {
  return <caption className="caption-bottom px-3 py-2 text-left text-xs text-graphite-muted">Times in UTC.</caption>;
}
