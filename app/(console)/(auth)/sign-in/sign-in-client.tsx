"use client";

import { useMutation, useQueryClient } from "@tanstack/react-query";
import Link from "next/link";
import { useRouter } from "next/navigation";
import { useState, type FormEvent } from "react";
import { SignInBody, type SignInInput } from "@/lib/api/schemas";
import { api, describeProblem } from "@/components/data/api";
import { checkWith, fieldErrorsOfProblem, type FieldErrors } from "@/components/forms/field-errors";
import { Alert } from "@/components/ui/alert";
import { Button } from "@/components/ui/button";
import { TextField } from "@/components/ui/field";

export function SignInForm({ next }: { next: string }) {
  const router = useRouter();
  const queryClient = useQueryClient();
  const [values, setValues] = useState({ email: "", password: "" });
  const [errors, setErrors] = useState<FieldErrors>({});

  const signIn = useMutation({
    mutationFn: (body: SignInInput) => api<void>("/session", { method: "POST", body }),
    onSuccess: () => {
      queryClient.clear();
      router.replace(next);
    },
    onError: (error) => setErrors(fieldErrorsOfProblem(error)),
  });

  function submit(event: FormEvent) {
    event.preventDefault();
    const checked = checkWith(SignInBody, values);
    setErrors(checked.ok ? {} : checked.errors);
    if (checked.ok) signIn.mutate(checked.data);
  }

  return (
    <form onSubmit={submit} noValidate className="flex flex-col gap-4">
      <TextField
        label="E-mail"
        type="email"
        autoComplete="username"
        value={values.email}
        onChange={(e) => setValues({ ...values, email: e.target.value })}
        error={errors.email}
      />
      <TextField
        label="Password"
        type="password"
        autoComplete="current-password"
        value={values.password}
        onChange={(e) => setValues({ ...values, password: e.target.value })}
        error={errors.password}
      />
      {signIn.error !== null && <Alert>{describeProblem(signIn.error)}</Alert>}
      <Button type="submit" variant="primary" disabled={signIn.isPending}>
        {signIn.isPending ? "Signing in…" : "Sign in"}
      </Button>
      <p className="text-center text-xs">
        <Link href="/reset-password">Forgot your password?</Link>
      </p>
    </form>
  );
}
