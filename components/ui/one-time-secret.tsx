"use client";

import { useId, type ReactNode } from "react";
import { Alert } from "@/components/ui/alert";
import { Button } from "@/components/ui/button";
import { CopyButton } from "@/components/ui/copy-button";
import { Dialog } from "@/components/ui/dialog";

export interface OneTimeSecretDialogProps {
  title: string;
  secret: string;
  /** Why it must be copied now. */
  warning: ReactNode;
  onClose: () => void;
  /** Notes under the secret (what it belongs to, how long an old one lasts). */
  children?: ReactNode;
}

// A secret the server returns once: a warning, the value ready to select with a copy button, and a dialog that
// Escape does not close, so the secret is acknowledged with a button.
export function OneTimeSecretDialog({ title, secret, warning, onClose, children }: OneTimeSecretDialogProps) {
  const id = useId();
  return (
    <Dialog
      open
      title={title}
      onClose={onClose}
      dismissible={false}
      actions={
        <Button variant="primary" onClick={onClose}>
          I have stored it
        </Button>
      }
    >
      <Alert tone="warning">{warning}</Alert>
      <div>
        <label className="label" htmlFor={id}>
          Secret
        </label>
        <div className="flex items-center gap-2">
          <input id={id} readOnly value={secret} className="input font-mono text-xs" onFocus={(e) => e.target.select()} />
          <CopyButton text={secret} label="Copy secret" />
        </div>
      </div>
      {children}
    </Dialog>
  );
}
