"use client";

import type { ReactNode } from "react";
import { describeProblem } from "@/components/data/api";
import { Alert } from "@/components/ui/alert";
import { Button } from "@/components/ui/button";
import { Dialog } from "@/components/ui/dialog";

export interface ConfirmDialogProps {
  open: boolean;
  title: string;
  confirmLabel: string;
  tone?: "primary" | "danger";
  pending: boolean;
  error: unknown;
  onConfirm: () => void;
  onClose: () => void;
  children: ReactNode;
}

// Every destructive or security-relevant action goes through one explicit confirmation.
export function ConfirmDialog(props: ConfirmDialogProps) {
  const { open, title, confirmLabel, tone = "danger", pending, error, onConfirm, onClose, children } = props;
  return (
    <Dialog
      open={open}
      title={title}
      onClose={onClose}
      actions={
        <>
          <Button onClick={onClose} disabled={pending}>
            Cancel
          </Button>
          <Button variant={tone} onClick={onConfirm} disabled={pending}>
            {pending ? "Working…" : confirmLabel}
          </Button>
        </>
      }
    >
      {children}
      {error !== null && error !== undefined && <Alert>{describeProblem(error)}</Alert>}
    </Dialog>
  );
}
