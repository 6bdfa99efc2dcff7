"use client";

import { useMutation } from "@tanstack/react-query";
import Link from "next/link";
import { useState, type FormEvent } from "react";
import { PasswordResetConfirmBody, PasswordResetRequestBody, type z } from "@/lib/api/schemas";
import { api, describeProblem } from "@/components/data/api";
import { checkWith, fieldErrorsOfProblem, type FieldErrors } from "@/components/forms/field-errors";
import { NewPasswordFields, confirmError, type NewPasswordValues } from "@/components/forms/new-password-fields";
import { Alert } from "@/components/ui/alert";
import { Button } from "@/components/ui/button";
import { TextField } from "@/components/ui/field";

export function RequestResetForm() {
  const [email, setEmail] = useState("");
  const [errors, setErrors] = useState<FieldErrors>({});
  const request = useMutation({
    mutationFn: (body: z.infer<typeof PasswordResetRequestBody>) =>
      api<void>("/password-resets", { method: "POST", body }),
    onError: (error) => setErrors(fieldErrorsOfProblem(error)),
  });

  function submit(event: FormEvent) {
    event.preventDefault();
    const checked = checkWith(PasswordResetRequestBody, { email });
    setErrors(checked.ok ? {} : checked.errors);
    if (checked.ok) request.mutate(checked.data);
  }

  if (request.isSuccess) {
    // The API answers the same for every address, so the page does too.
    return (
      <div className="flex flex-col gap-4">
        <Alert tone="info">If an account uses that address, a reset link is on its way. It works once and expires soon.</Alert>
        <Link href="/sign-in">Back to sign in</Link>
      </div>
    );
  }

  return (
    <form onSubmit={submit} noValidate className="flex flex-col gap-4">
      <p className="text-graphite-muted">We will e-mail you a link to choose a new password.</p>
      <TextField
        label="E-mail"
        type="email"
        autoComplete="email"
        value={email}
        onChange={(e) => setEmail(e.target.value)}
        error={errors.email}
      />
      {request.error !== null && <Alert>{describeProblem(request.error)}</Alert>}
      <Button type="submit" variant="primary" disabled={request.isPending}>
        Send reset link
      </Button>
      <p className="text-center text-xs">
        <Link href="/sign-in">Back to sign in</Link>
      </p>
    </form>
  );
}

export function SetPasswordForm({ token }: { token: string }) {
  const [values, setValues] = useState<NewPasswordValues>({ password: "", confirm: "" });
  const [errors, setErrors] = useState<FieldErrors>({});
  const confirm = useMutation({
    mutationFn: (body: z.infer<typeof PasswordResetConfirmBody>) =>
      api<void>("/password-resets/confirm", { method: "POST", body }),
    onError: (error) => setErrors(fieldErrorsOfProblem(error)),
  });

  function submit(event: FormEvent) {
    event.preventDefault();
    const checked = checkWith(PasswordResetConfirmBody, { token, password: values.password });
    const mismatch = confirmError(values);
    setErrors({ ...(checked.ok ? {} : checked.errors), confirm: mismatch });
    if (checked.ok && mismatch === undefined) confirm.mutate(checked.data);
  }

  if (confirm.isSuccess) {
    return (
      <div className="flex flex-col gap-4">
        <Alert tone="info">Your password is changed. Sign in with it now.</Alert>
        <Link href="/sign-in">Sign in</Link>
      </div>
    );
  }

  return (
    <form onSubmit={submit} noValidate className="flex flex-col gap-4">
      <NewPasswordFields values={values} onChange={setValues} errors={errors} />
      {errors.token !== undefined && <Alert>This link is not valid. Ask for a new one.</Alert>}
      {confirm.error !== null && <Alert>{describeProblem(confirm.error)}</Alert>}
      <Button type="submit" variant="primary" disabled={confirm.isPending}>
        Set password
      </Button>
    </form>
  );
}
