"use client";

import { useId, type ReactNode } from "react";
import { Alert } from "@/components/ui/alert";
import { CopyButton } from "@/components/ui/copy-button";

// A secret the server returns once: a warning, the value ready to select, and a copy button.
export function OneTimeSecret({ secret, label = "Secret", warning }: { secret: string; label?: string; warning: ReactNode }) {
  const id = useId();
  return (
    <>
      <Alert tone="warning">{warning}</Alert>
      <div>
        <label className="label" htmlFor={id}>
          {label}
        </label>
        <div className="flex items-center gap-2">
          <input id={id} readOnly value={secret} className="input font-mono text-xs" onFocus={(e) => e.target.select()} />
          <CopyButton text={secret} label={`Copy ${label.toLowerCase()}`} />
        </div>
      </div>
    </>
  );
}
