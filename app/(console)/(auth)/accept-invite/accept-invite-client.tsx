"use client";

import { useMutation, useQueryClient } from "@tanstack/react-query";
import { useRouter } from "next/navigation";
import { useState, type FormEvent } from "react";
import { InvitationAcceptBody, type z } from "@/lib/api/schemas";
import { api, describeProblem } from "@/components/data/api";
import { checkWith, fieldErrorsOfProblem, type FieldErrors } from "@/components/forms/field-errors";
import { NewPasswordFields, confirmError, type NewPasswordValues } from "@/components/forms/new-password-fields";
import { Alert } from "@/components/ui/alert";
import { Button } from "@/components/ui/button";
import { TextField } from "@/components/ui/field";

export function AcceptInviteForm({ token }: { token: string }) {
  const router = useRouter();
  const queryClient = useQueryClient();
  const [name, setName] = useState("");
  const [password, setPassword] = useState<NewPasswordValues>({ password: "", confirm: "" });
  const [errors, setErrors] = useState<FieldErrors>({});

  // Accepting signs the new member in (the API sets the session cookie), so go straight to the console.
  const accept = useMutation({
    mutationFn: (body: z.infer<typeof InvitationAcceptBody>) => api<void>("/invitations/accept", { method: "POST", body }),
    onSuccess: () => {
      queryClient.clear();
      router.replace("/");
    },
    onError: (error) => setErrors(fieldErrorsOfProblem(error)),
  });

  function submit(event: FormEvent) {
    event.preventDefault();
    const checked = checkWith(InvitationAcceptBody, { token, name, password: password.password });
    const mismatch = confirmError(password);
    setErrors({ ...(checked.ok ? {} : checked.errors), confirm: mismatch });
    if (checked.ok && mismatch === undefined) accept.mutate(checked.data);
  }

  return (
    <form onSubmit={submit} noValidate className="flex flex-col gap-4">
      <TextField
        label="Your name"
        autoComplete="name"
        value={name}
        onChange={(e) => setName(e.target.value)}
        error={errors.name}
      />
      <NewPasswordFields values={password} onChange={setPassword} errors={errors} />
      {errors.token !== undefined && <Alert>This invitation link is not valid. Ask your admin for a new one.</Alert>}
      {accept.error !== null && <Alert>{describeProblem(accept.error)}</Alert>}
      <Button type="submit" variant="primary" disabled={accept.isPending}>
        {accept.isPending ? "Joining…" : "Join"}
      </Button>
    </form>
  );
}
