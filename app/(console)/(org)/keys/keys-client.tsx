"use client";

import { useMutation, useQuery, useQueryClient } from "@tanstack/react-query";
import { useId, useState, type FormEvent } from "react";
import {
  ApiKeyCreateBody,
  ApiKeyRotateBody,
  type ApiKeyBody,
  type ApiKeyCreateInput,
} from "@/lib/api/schemas";
import { SCOPES, type Scope } from "@/lib/auth/permissions";
import { ApiProblem, api, describeProblem } from "@/components/data/api";
import { allows, useMe } from "@/components/data/use-me";
import { ConfirmMutation } from "@/components/forms/confirm-mutation";
import { checkWith, fieldErrorsOfProblem, type FieldErrors } from "@/components/forms/field-errors";
import { RotateSecretDialog } from "@/components/forms/rotate-secret-dialog";
import { formatInstant } from "@/components/format/instant";
import { Alert } from "@/components/ui/alert";
import { Badge, CodeBadges, type BadgeTone } from "@/components/ui/badge";
import { Button } from "@/components/ui/button";
import { DataTable, actionsColumn, type Column } from "@/components/ui/data-table";
import { Dialog } from "@/components/ui/dialog";
import { CheckboxGroup, TextField } from "@/components/ui/field";
import { OneTimeSecretDialog } from "@/components/ui/one-time-secret";
import { PageHeader } from "@/components/ui/page-header";

const KEYS_QUERY_KEY = ["keys"] as const;
const DEFAULT_GRACE_HOURS = 24;

const SCOPE_HINTS: Record<Scope, string> = {
  "datasets:write": "upload and delete datasets",
  "jobs:write": "queue and cancel analyses",
  "jobs:read": "follow analyses",
  "results:read": "read and download results",
  "provenance:read": "download signed provenance",
  admin: "everything an org admin may do",
};

type Open =
  | { kind: "create" }
  | { kind: "secret"; key: ApiKeyBody; secret: string; rotated: boolean }
  | { kind: "rotate"; key: ApiKeyBody }
  | { kind: "revoke"; key: ApiKeyBody }
  | null;

function keyStatus(key: ApiKeyBody, now: number): { tone: BadgeTone; text: string; note?: string } {
  if (key.revokedAt !== null) return { tone: "bad", text: "Revoked" };
  if (key.expiresAt !== null && Date.parse(key.expiresAt) <= now) return { tone: "bad", text: "Expired" };
  if (key.graceUntil !== null && Date.parse(key.graceUntil) > now) {
    return { tone: "warn", text: "Rotated", note: `old secret valid until ${formatInstant(key.graceUntil, false)}` };
  }
  return { tone: "good", text: "Active" };
}

const KEY_COLUMNS: Column<ApiKeyBody>[] = [
  { key: "name", header: "Name", className: "min-w-[8rem] font-medium", cell: (key) => key.name },
  { key: "prefix", header: "Key", className: "whitespace-nowrap font-mono text-xs", cell: (key) => `${key.prefix}…` },
  {
    key: "scopes",
    header: "Scopes",
    cell: (key) => <CodeBadges values={key.scopes} className="min-w-[11rem] max-w-[15rem]" />,
  },
  { key: "created", header: "Created", className: "whitespace-nowrap", cell: (key) => formatInstant(key.createdAt, false) },
  { key: "expires", header: "Expires", className: "whitespace-nowrap", cell: (key) => (key.expiresAt === null ? "never" : formatInstant(key.expiresAt, false)) },
  { key: "used", header: "Last used", className: "whitespace-nowrap", cell: (key) => (key.lastUsedAt === null ? "never" : formatInstant(key.lastUsedAt, false)) },
  {
    key: "status",
    header: "Status",
    className: "max-w-[11rem]",
    cell: (key) => {
      const status = keyStatus(key, Date.now());
      return (
        <>
          <Badge tone={status.tone}>{status.text}</Badge>
          {status.note !== undefined && <span className="mt-0.5 block text-xs text-graphite-muted">{status.note}</span>}
        </>
      );
    },
  },
];

function keyActions(onRotate: (key: ApiKeyBody) => void, onRevoke: (key: ApiKeyBody) => void): Column<ApiKeyBody> {
  return actionsColumn(
    (key) =>
      key.revokedAt === null && (
        <>
          <Button size="sm" aria-label={`Rotate ${key.name}`} onClick={() => onRotate(key)}>
            Rotate
          </Button>
          <Button size="sm" aria-label={`Revoke ${key.name}`} onClick={() => onRevoke(key)}>
            Revoke
          </Button>
        </>
      ),
  );
}

export function KeysPanel() {
  const { data: me } = useMe();
  const manage = allows(me, "keys:manage");
  const keys = useQuery({ queryKey: KEYS_QUERY_KEY, queryFn: () => api<{ items: ApiKeyBody[] }>("/keys") });
  const [open, setOpen] = useState<Open>(null);
  const forbidden = keys.error instanceof ApiProblem && keys.error.status === 403;

  return (
    <>
      <PageHeader
        title="API keys"
        description="Keys let scripts call the API for this organisation. Each key holds only the scopes it needs; its secret is shown once."
        actions={
          manage ? (
            <Button variant="primary" onClick={() => setOpen({ kind: "create" })}>
              Create key
            </Button>
          ) : undefined
        }
      />
      {!manage && (
        <div className="mb-4">
          <Alert tone="info">Your role ({me?.role ?? "—"}) cannot create, rotate or revoke API keys.</Alert>
        </div>
      )}
      {keys.error !== null && !forbidden && <Alert>{describeProblem(keys.error)}</Alert>}
      {keys.data !== undefined && (
        <DataTable
          label="API keys"
          columns={manage ? [...KEY_COLUMNS, keyActions((key) => setOpen({ kind: "rotate", key }), (key) => setOpen({ kind: "revoke", key }))] : KEY_COLUMNS}
          rows={keys.data.items}
          rowKey={(key) => key.id}
          rowProps={(key) => ({ className: key.revokedAt === null ? undefined : "text-graphite-muted" })}
          empty="No keys yet."
        />
      )}
      {keys.isPending && !forbidden && <p className="text-graphite-muted">Loading keys…</p>}

      {open?.kind === "create" && (
        <CreateKeyDialog
          onClose={() => setOpen(null)}
          onCreated={(key, secret) => setOpen({ kind: "secret", key, secret, rotated: false })}
        />
      )}
      {open?.kind === "rotate" && (
        <RotateKeyDialog
          apiKey={open.key}
          onClose={() => setOpen(null)}
          onRotated={(key, secret) => setOpen({ kind: "secret", key, secret, rotated: true })}
        />
      )}
      {open?.kind === "revoke" && <RevokeKeyDialog apiKey={open.key} onClose={() => setOpen(null)} />}
      {open?.kind === "secret" && (
        <SecretDialog apiKey={open.key} secret={open.secret} rotated={open.rotated} onClose={() => setOpen(null)} />
      )}
    </>
  );
}

/** `YYYY-MM-DD` from a date input → the end of that day in UTC, so "expires on the 3rd" includes the 3rd. */
function endOfUtcDay(date: string): string | undefined {
  return date === "" ? undefined : `${date}T23:59:59.999Z`;
}

function CreateKeyDialog({
  onClose,
  onCreated,
}: {
  onClose: () => void;
  onCreated: (key: ApiKeyBody, secret: string) => void;
}) {
  const queryClient = useQueryClient();
  const formId = useId();
  const [name, setName] = useState("");
  const [scopes, setScopes] = useState<string[]>([]);
  const [expiresOn, setExpiresOn] = useState("");
  const [errors, setErrors] = useState<FieldErrors>({});

  const create = useMutation({
    mutationFn: (body: ApiKeyCreateInput) =>
      api<{ key: ApiKeyBody; secret: string }>("/keys", { method: "POST", body }),
    onSuccess: (result) => {
      void queryClient.invalidateQueries({ queryKey: KEYS_QUERY_KEY });
      onCreated(result.key, result.secret);
    },
    onError: (error) => setErrors(fieldErrorsOfProblem(error)),
  });

  function submit(event: FormEvent) {
    event.preventDefault();
    const expiresAt = endOfUtcDay(expiresOn);
    const checked = checkWith(ApiKeyCreateBody, { name, scopes, ...(expiresAt === undefined ? {} : { expiresAt }) });
    const past = expiresAt !== undefined && Date.parse(expiresAt) <= Date.now();
    setErrors({ ...(checked.ok ? {} : checked.errors), ...(past ? { expiresAt: "must be in the future" } : {}) });
    if (checked.ok && !past) create.mutate(checked.data);
  }

  return (
    <Dialog
      open
      title="Create an API key"
      onClose={onClose}
      actions={
        <>
          <Button onClick={onClose} disabled={create.isPending}>
            Cancel
          </Button>
          <Button type="submit" form={formId} variant="primary" disabled={create.isPending}>
            {create.isPending ? "Creating…" : "Create"}
          </Button>
        </>
      }
    >
      <form id={formId} onSubmit={submit} noValidate className="flex flex-col gap-4">
        <TextField
          label="Name"
          value={name}
          onChange={(e) => setName(e.target.value)}
          hint="What uses it, e.g. “nightly basin run”."
          error={errors.name}
        />
        <CheckboxGroup
          legend="Scopes"
          subject="The key"
          options={SCOPES.map((s) => ({ value: s, hint: SCOPE_HINTS[s] }))}
          value={scopes}
          onChange={setScopes}
          error={errors.scopes}
        />
        <TextField
          label="Expires on (optional)"
          type="date"
          value={expiresOn}
          onChange={(e) => setExpiresOn(e.target.value)}
          hint="The key stops working at the end of that day (UTC). Leave empty for no expiry."
          error={errors.expiresAt}
        />
        {create.error !== null && <Alert>{describeProblem(create.error)}</Alert>}
      </form>
    </Dialog>
  );
}

function SecretDialog({
  apiKey,
  secret,
  rotated,
  onClose,
}: {
  apiKey: ApiKeyBody;
  secret: string;
  rotated: boolean;
  onClose: () => void;
}) {
  return (
    <OneTimeSecretDialog
      title={rotated ? `New secret for “${apiKey.name}”` : `Key “${apiKey.name}” created`}
      secret={secret}
      warning="Copy the secret now. It is shown only once: Rillscale keeps a hash of it, not the secret."
      onClose={onClose}
    >
      {rotated && apiKey.graceUntil !== null && (
        <p className="text-graphite-muted">
          The previous secret keeps working until {formatInstant(apiKey.graceUntil)}, so running scripts can switch
          over; after that it is refused.
        </p>
      )}
    </OneTimeSecretDialog>
  );
}

function RotateKeyDialog({
  apiKey,
  onClose,
  onRotated,
}: {
  apiKey: ApiKeyBody;
  onClose: () => void;
  onRotated: (key: ApiKeyBody, secret: string) => void;
}) {
  return (
    <RotateSecretDialog<{ key: ApiKeyBody; secret: string }>
      title={`Rotate “${apiKey.name}”?`}
      confirmLabel="Rotate key"
      path={`/keys/${encodeURIComponent(apiKey.id)}/rotate`}
      schema={ApiKeyRotateBody}
      hours={{ field: "graceHours", label: "Grace period (hours)", hint: "0 refuses the current secret at once.", initial: DEFAULT_GRACE_HOURS }}
      invalidates={KEYS_QUERY_KEY}
      onRotated={(r) => onRotated(r.key, r.secret)}
      onClose={onClose}
    >
      <p>
        A new secret replaces the current one. The current secret keeps working during the grace period, then it is
        refused. The org&apos;s admins are e-mailed.
      </p>
    </RotateSecretDialog>
  );
}

function RevokeKeyDialog({ apiKey, onClose }: { apiKey: ApiKeyBody; onClose: () => void }) {
  return (
    <ConfirmMutation
      title={`Revoke “${apiKey.name}”?`}
      confirmLabel="Revoke key"
      run={() => api<{ key: ApiKeyBody }>(`/keys/${encodeURIComponent(apiKey.id)}/revoke`, { method: "POST" })}
      invalidates={KEYS_QUERY_KEY}
      onDone={onClose}
      onClose={onClose}
    >
      <p>
        Every request with this key, including a secret still in its grace period, is refused from now on. This cannot be
        undone; scripts need a new key.
      </p>
    </ConfirmMutation>
  );
}
