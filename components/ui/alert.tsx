import type { ReactNode } from "react";

const TONES = {
  error: "border-rust/40 bg-rust-wash text-rust-deep",
  warning: "border-amber/40 bg-amber-wash text-amber",
  info: "border-lichen/30 bg-lichen-wash text-lichen-night",
} as const;

export function Alert({ tone = "error", children }: { tone?: keyof typeof TONES; children: ReactNode }) {
  return (
    <div role={tone === "error" ? "alert" : "status"} className={`rounded border px-3 py-2 text-sm ${TONES[tone]}`}>
      {children}
    </div>
  );
}
