"use client";

import { PASSWORD_MIN_CHARS } from "@/lib/api/schemas";
import { TextField } from "@/components/ui/field";

export interface NewPasswordValues {
  password: string;
  confirm: string;
}

/** "Passwords differ" is the one check the API cannot make, so the form makes it. */
export function confirmError(values: NewPasswordValues): string | undefined {
  return values.confirm !== values.password ? "does not match the password" : undefined;
}

// A new password typed twice, with the schema's rule stated up front instead of after a failure.
export function NewPasswordFields({
  values,
  onChange,
  errors,
}: {
  values: NewPasswordValues;
  onChange: (next: NewPasswordValues) => void;
  errors: { password?: string; confirm?: string };
}) {
  return (
    <>
      <TextField
        label="New password"
        type="password"
        autoComplete="new-password"
        value={values.password}
        onChange={(e) => onChange({ ...values, password: e.target.value })}
        hint={`At least ${PASSWORD_MIN_CHARS} characters; a passphrase of a few words works well.`}
        error={errors.password}
      />
      <TextField
        label="Repeat password"
        type="password"
        autoComplete="new-password"
        value={values.confirm}
        onChange={(e) => onChange({ ...values, confirm: e.target.value })}
        error={errors.confirm}
      />
    </>
  );
}
