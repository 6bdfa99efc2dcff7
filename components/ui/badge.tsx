import type { ReactNode } from "react";

const TONES = {
  neutral: "border-paper-edge bg-paper-sunk text-graphite-soft",
  good: "border-lichen/30 bg-lichen-wash text-lichen-night",
  warn: "border-amber/30 bg-amber-wash text-amber",
  bad: "border-rust/30 bg-rust-wash text-rust-deep",
} as const;

export type BadgeTone = keyof typeof TONES;

// Badges always carry words: colour only reinforces what the text already says.
export function Badge({ tone = "neutral", children }: { tone?: BadgeTone; children: ReactNode }) {
  return (
    <span className={`inline-flex items-center rounded border px-1.5 py-px text-xs font-medium ${TONES[tone]}`}>
      {children}
    </span>
  );
}

/** Identifiers (scopes, event names) as a wrapping row of monospace badges. */
export function CodeBadges({ values, className = "" }: { values: readonly string[]; className?: string }) {
  return (
    <div className={`flex flex-wrap gap-1 ${className}`}>
      {values.map((v) => (
        <Badge key={v}>
          <span className="font-mono">{v}</span>
        </Badge>
      ))}
    </div>
  );
}
