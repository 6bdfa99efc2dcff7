"use client";

import { useState } from "react";
import { Button } from "@/components/ui/button";

// The clipboard API needs a secure context; on plain-http hosts the user selects the text instead.
export function CopyButton({ text, label = "Copy" }: { text: string; label?: string }) {
  const [state, setState] = useState<"idle" | "copied" | "failed">("idle");
  return (
    <Button
      size="sm"
      onClick={() => {
        if (navigator.clipboard === undefined) {
          setState("failed");
          return;
        }
        navigator.clipboard
          .writeText(text)
          .then(() => setState("copied"))
          .catch(() => setState("failed"));
      }}
    >
      {state === "copied" ? "Copied" : state === "failed" ? "Select and copy" : label}
    </Button>
  );
}
