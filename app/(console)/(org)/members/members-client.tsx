"use client";

import { useMutation, useQuery, useQueryClient } from "@tanstack/react-query";
import { useState, type FormEvent } from "react";
import { InvitationCreateBody, type InvitationBody, type MemberBody, type z } from "@/lib/api/schemas";
import { ROLES, type Role } from "@/lib/auth/permissions";
import { ApiProblem, api, describeProblem } from "@/components/data/api";
import { allows, useMe } from "@/components/data/use-me";
import { ConfirmMutation } from "@/components/forms/confirm-mutation";
import { checkWith, fieldErrorsOfProblem, type FieldErrors } from "@/components/forms/field-errors";
import { formatInstant } from "@/components/format/instant";
import { Alert } from "@/components/ui/alert";
import { Badge } from "@/components/ui/badge";
import { Button } from "@/components/ui/button";
import { DataTable, actionsColumn, type Column } from "@/components/ui/data-table";
import { SelectField, TextField } from "@/components/ui/field";
import { PageHeader } from "@/components/ui/page-header";

const MEMBERS_QUERY_KEY = ["members"] as const;
const INVITATIONS_QUERY_KEY = ["invitations"] as const;

const ROLE_WORDS: Record<Role, string> = {
  admin: "admin — everything, including keys and members",
  analyst: "analyst — datasets, analyses and results",
  auditor: "auditor — reads the audit log, results and provenance",
};
const ROLE_OPTIONS = ROLES.map((r) => ({ value: r, label: r }));

type Pending = { kind: "role"; member: MemberBody; role: Role } | { kind: "remove"; member: MemberBody } | null;

const INVITATION_COLUMNS: Column<InvitationBody>[] = [
  { key: "email", header: "E-mail", cell: (inv) => inv.email },
  { key: "role", header: "Role", cell: (inv) => inv.role },
  { key: "sent", header: "Sent", className: "whitespace-nowrap", cell: (inv) => formatInstant(inv.createdAt, false) },
  { key: "expires", header: "Link expires", className: "whitespace-nowrap", cell: (inv) => formatInstant(inv.expiresAt, false) },
];

function memberColumns(selfId: string | undefined, manage: boolean, setPending: (p: Pending) => void): Column<MemberBody>[] {
  const columns: Column<MemberBody>[] = [
    {
      key: "name",
      header: "Name",
      className: "font-medium",
      cell: (member) => (
        <>
          {member.name} {member.userId === selfId && <Badge>you</Badge>}
        </>
      ),
    },
    { key: "email", header: "E-mail", cell: (member) => member.email },
    {
      key: "role",
      header: "Role",
      cell: (member) =>
        manage ? (
          <select
            aria-label={`Role of ${member.email}`}
            className="input w-32 py-0.5 text-dense"
            value={member.role}
            onChange={(e) => setPending({ kind: "role", member, role: e.target.value as Role })}
          >
            {ROLES.map((r) => (
              <option key={r} value={r}>
                {r}
              </option>
            ))}
          </select>
        ) : (
          member.role
        ),
    },
    { key: "joined", header: "Joined", className: "whitespace-nowrap", cell: (member) => formatInstant(member.joinedAt, false) },
  ];
  if (!manage) return columns;
  return [
    ...columns,
    actionsColumn((member) => (
      <Button size="sm" aria-label={`Remove ${member.email}`} onClick={() => setPending({ kind: "remove", member })}>
        Remove
      </Button>
    )),
  ];
}

export function MembersPanel() {
  const { data: me } = useMe();
  const manage = allows(me, "members:manage");
  const members = useQuery({ queryKey: MEMBERS_QUERY_KEY, queryFn: () => api<{ items: MemberBody[] }>("/members") });
  const invitations = useQuery({
    queryKey: INVITATIONS_QUERY_KEY,
    queryFn: () => api<{ items: InvitationBody[] }>("/invitations"),
    enabled: manage,
  });
  const [pending, setPending] = useState<Pending>(null);
  const forbidden = members.error instanceof ApiProblem && members.error.status === 403;

  return (
    <>
      <PageHeader title="Members" description="People in this organisation and what their role lets them do." />
      {!manage && (
        <div className="mb-4">
          <Alert tone="info">Your role ({me?.role ?? "—"}) cannot invite members or change roles.</Alert>
        </div>
      )}
      {manage && <InviteForm />}
      {members.error !== null && !forbidden && <Alert>{describeProblem(members.error)}</Alert>}
      {members.data !== undefined && (
        <DataTable label="Members" columns={memberColumns(me?.user?.id, manage, setPending)} rows={members.data.items} rowKey={(m) => m.userId} />
      )}
      {manage && invitations.data !== undefined && invitations.data.items.length > 0 && (
        <section className="mt-6" aria-labelledby="pending-heading">
          <h2 id="pending-heading" className="mb-2">
            Pending invitations
          </h2>
          <DataTable label="Pending invitations" columns={INVITATION_COLUMNS} rows={invitations.data.items} rowKey={(inv) => inv.id} />
        </section>
      )}
      {pending?.kind === "role" && (
        <ChangeRoleDialog member={pending.member} role={pending.role} onClose={() => setPending(null)} />
      )}
      {pending?.kind === "remove" && <RemoveMemberDialog member={pending.member} onClose={() => setPending(null)} />}
    </>
  );
}

function InviteForm() {
  const queryClient = useQueryClient();
  const [values, setValues] = useState<{ email: string; role: Role }>({ email: "", role: "analyst" });
  const [errors, setErrors] = useState<FieldErrors>({});
  const invite = useMutation({
    mutationFn: (body: z.infer<typeof InvitationCreateBody>) =>
      api<InvitationBody>("/invitations", { method: "POST", body }),
    onSuccess: () => {
      void queryClient.invalidateQueries({ queryKey: INVITATIONS_QUERY_KEY });
      setValues({ email: "", role: values.role });
    },
    onError: (error) => setErrors(fieldErrorsOfProblem(error)),
  });

  function submit(event: FormEvent) {
    event.preventDefault();
    const checked = checkWith(InvitationCreateBody, values);
    setErrors(checked.ok ? {} : checked.errors);
    if (checked.ok) invite.mutate(checked.data);
  }

  return (
    <form onSubmit={submit} noValidate className="card mb-5 p-4" aria-label="Invite a member">
      <h2 className="mb-3">Invite a member</h2>
      <div className="grid items-start gap-3 md:grid-cols-[1fr_16rem_auto]">
        <TextField
          label="E-mail"
          type="email"
          value={values.email}
          onChange={(e) => setValues({ ...values, email: e.target.value })}
          error={errors.email}
        />
        <SelectField
          label="Role"
          options={ROLE_OPTIONS}
          value={values.role}
          onChange={(e) => setValues({ ...values, role: e.target.value as Role })}
          hint={ROLE_WORDS[values.role]}
          error={errors.role}
        />
        <Button type="submit" variant="primary" className="md:mt-5" disabled={invite.isPending}>
          Send invitation
        </Button>
      </div>
      <div className="mt-3 empty:hidden">
        {invite.isSuccess && (
          <Alert tone="info">
            Invitation sent to {invite.data.email}; the link expires {formatInstant(invite.data.expiresAt)}.
          </Alert>
        )}
        {invite.error !== null && <Alert>{describeProblem(invite.error)}</Alert>}
      </div>
    </form>
  );
}

function ChangeRoleDialog({ member, role, onClose }: { member: MemberBody; role: Role; onClose: () => void }) {
  return (
    <ConfirmMutation
      title={`Change the role of ${member.name} to ${role}?`}
      confirmLabel="Change role"
      tone="primary"
      run={() => api<MemberBody>(`/members/${encodeURIComponent(member.userId)}`, { method: "PATCH", body: { role } })}
      invalidates={MEMBERS_QUERY_KEY}
      onDone={onClose}
      onClose={onClose}
    >
      <p>
        {member.email} is {member.role} now. New role: {ROLE_WORDS[role]}.
      </p>
    </ConfirmMutation>
  );
}

function RemoveMemberDialog({ member, onClose }: { member: MemberBody; onClose: () => void }) {
  return (
    <ConfirmMutation
      title={`Remove ${member.name}?`}
      confirmLabel="Remove member"
      run={() => api<void>(`/members/${encodeURIComponent(member.userId)}`, { method: "DELETE" })}
      invalidates={MEMBERS_QUERY_KEY}
      onDone={onClose}
      onClose={onClose}
    >
      <p>
        {member.email} loses access to this organisation at once. Their past actions stay in the audit log.
      </p>
    </ConfirmMutation>
  );
}
