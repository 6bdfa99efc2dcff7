"use client";

import { useMutation, useQueryClient, type QueryKey } from "@tanstack/react-query";
import type { ReactNode } from "react";
import { ConfirmDialog } from "@/components/ui/confirm-dialog";

export interface ConfirmMutationProps<R> {
  title: string;
  confirmLabel: string;
  tone?: "primary" | "danger";
  /** The request the confirmation sends. */
  run: () => Promise<R>;
  /** Queries that are stale once it succeeded. */
  invalidates: QueryKey;
  onDone: (result: R) => void;
  onClose: () => void;
  children: ReactNode;
}

// A confirmation that sends one request: pending while it runs, its problem shown in the dialog, the lists it
// changes refetched when it succeeds.
export function ConfirmMutation<R>({ title, confirmLabel, tone, run, invalidates, onDone, onClose, children }: ConfirmMutationProps<R>) {
  const queryClient = useQueryClient();
  const mutation = useMutation({
    mutationFn: run,
    onSuccess: (result) => {
      void queryClient.invalidateQueries({ queryKey: invalidates });
      onDone(result);
    },
  });
  return (
    <ConfirmDialog
      open
      title={title}
      confirmLabel={confirmLabel}
      tone={tone}
      pending={mutation.isPending}
      error={mutation.error}
      onConfirm={() => mutation.mutate()}
      onClose={onClose}
    >
      {children}
    </ConfirmDialog>
  );
}
