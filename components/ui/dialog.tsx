"use client";

import { useEffect, useId, useRef, type ReactNode } from "react";

export interface DialogProps {
  open: boolean;
  title: string;
  onClose: () => void;
  children: ReactNode;
  /** Buttons shown at the bottom right. */
  actions?: ReactNode;
  /** False when Escape must not close it (a secret shown once must be acknowledged with a button). */
  dismissible?: boolean;
}

// The native <dialog> in modal mode: focus trapping, Escape and the backdrop come from the browser.
export function Dialog({ open, title, onClose, children, actions, dismissible = true }: DialogProps) {
  const ref = useRef<HTMLDialogElement>(null);
  const titleId = useId();

  useEffect(() => {
    const dialog = ref.current;
    if (dialog === null) return;
    if (open && !dialog.open) dialog.showModal();
    if (!open && dialog.open) dialog.close();
  }, [open]);

  return (
    <dialog
      ref={ref}
      aria-labelledby={titleId}
      onClose={onClose}
      onCancel={(e) => {
        e.preventDefault();
        if (dismissible) onClose();
      }}
      className="w-full max-w-lg rounded-card border border-paper-line bg-white p-0 text-graphite shadow-xl backdrop:bg-graphite/40"
    >
      {open && (
        <div className="flex flex-col gap-4 p-5">
          <h2 id={titleId}>{title}</h2>
          <div className="flex flex-col gap-3 text-sm">{children}</div>
          {actions !== undefined && <div className="flex justify-end gap-2 pt-1">{actions}</div>}
        </div>
      )}
    </dialog>
  );
}
