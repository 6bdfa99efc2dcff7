import Link from "next/link";

// The caution every page carries: results are for screening, never a substitute for engineering judgment.
export const SCREENING_CAUTION =
  "Screening analysis — not a substitute for licensed engineering judgment; defer to local codes and the responsible authority.";

export function SiteFooter() {
  return (
    <footer className="border-t border-paper-line bg-paper-sunk">
      <div className="mx-auto flex max-w-console flex-wrap items-baseline justify-between gap-2 px-6 py-3 text-xs text-graphite-muted">
        <p role="note" aria-label="Caution">
          <span className="font-semibold text-graphite-soft">Caution.</span> {SCREENING_CAUTION}
        </p>
        <p>
          <Link href="/docs">API reference</Link>
        </p>
      </div>
    </footer>
  );
}
