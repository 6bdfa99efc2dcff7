"use client";

import { useMutation, useQueryClient, type QueryKey } from "@tanstack/react-query";
import { useState, type ReactNode } from "react";
import type { z } from "zod";
import { api } from "@/components/data/api";
import { checkWith, fieldErrorsOfProblem, type FieldErrors } from "@/components/forms/field-errors";
import { ConfirmDialog } from "@/components/ui/confirm-dialog";
import { TextField } from "@/components/ui/field";

export interface RotateSecretDialogProps<R> {
  title: string;
  confirmLabel: string;
  /** POST path under /api/v1. */
  path: string;
  /** The body's schema: one field, the hours the previous secret stays good. */
  schema: z.ZodType;
  /** That field: its name in the body, its label and hint in the form, and its starting value. */
  hours: { field: string; label: string; hint: string; initial: number };
  invalidates: QueryKey;
  onRotated: (result: R) => void;
  onClose: () => void;
  /** What the rotation does, above the hours field. */
  children: ReactNode;
}

// Rotating a secret (an API key's, a webhook endpoint's): confirm, choose how long the previous one lasts, and
// hand the response (with the new secret, shown once) to the caller.
export function RotateSecretDialog<R>(props: RotateSecretDialogProps<R>) {
  const { title, confirmLabel, path, schema, hours: field, invalidates, onRotated, onClose, children } = props;
  const queryClient = useQueryClient();
  const [hours, setHours] = useState(String(field.initial));
  const [errors, setErrors] = useState<FieldErrors>({});
  const rotate = useMutation({
    mutationFn: (body: unknown) => api<R>(path, { method: "POST", body }),
    onSuccess: (result) => {
      void queryClient.invalidateQueries({ queryKey: invalidates });
      onRotated(result);
    },
    onError: (error) => setErrors(fieldErrorsOfProblem(error)),
  });

  function confirm() {
    const checked = checkWith(schema, { [field.field]: hours === "" ? undefined : Number(hours) });
    setErrors(checked.ok ? {} : checked.errors);
    if (checked.ok) rotate.mutate(checked.data);
  }

  return (
    <ConfirmDialog
      open
      title={title}
      confirmLabel={confirmLabel}
      tone="primary"
      pending={rotate.isPending}
      error={Object.keys(errors).length > 0 ? null : rotate.error}
      onConfirm={confirm}
      onClose={onClose}
    >
      {children}
      <TextField
        label={field.label}
        type="number"
        min={0}
        step={1}
        inputMode="numeric"
        value={hours}
        onChange={(e) => setHours(e.target.value)}
        hint={field.hint}
        error={errors[field.field]}
      />
    </ConfirmDialog>
  );
}
