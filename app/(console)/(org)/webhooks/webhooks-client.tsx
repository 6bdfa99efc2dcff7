"use client";

import { useMutation, useQuery, useQueryClient } from "@tanstack/react-query";
import Link from "next/link";
import { useState, type FormEvent } from "react";
import type { z } from "@/lib/api/schemas";
import { WEBHOOK_EVENTS, type WebhookEvent } from "@/lib/webhooks/events";
import {
  WebhookCreateBody,
  WebhookRotateBody,
  type WebhookDelivery,
  type WebhookDeliveryDetail,
  type WebhookEndpoint,
} from "@/lib/webhooks/schemas";
import { api, describeProblem } from "@/components/data/api";
import { allows, useMe } from "@/components/data/use-me";
import { ConfirmMutation } from "@/components/forms/confirm-mutation";
import { checkWith, fieldErrorsOfProblem, type FieldErrors } from "@/components/forms/field-errors";
import { RotateSecretDialog } from "@/components/forms/rotate-secret-dialog";
import { formatInstant, formatInstantPrecise } from "@/components/format/instant";
import { Alert } from "@/components/ui/alert";
import { Badge, CodeBadges, type BadgeTone } from "@/components/ui/badge";
import { Button } from "@/components/ui/button";
import { DataTable, ExpandButton, actionsColumn, type Column } from "@/components/ui/data-table";
import { CheckboxGroup, TextField } from "@/components/ui/field";
import { OneTimeSecretDialog } from "@/components/ui/one-time-secret";
import { PageHeader } from "@/components/ui/page-header";

type Endpoint = z.infer<typeof WebhookEndpoint>;
type Delivery = z.infer<typeof WebhookDelivery>;
type DeliveryDetail = z.infer<typeof WebhookDeliveryDetail>;

const WEBHOOKS_QUERY_KEY = ["webhooks"] as const;
const DEFAULT_OVERLAP_HOURS = 24;
/** The log refreshes while a delivery is still being tried, so a new attempt shows up without a reload. */
const PENDING_REFRESH_MS = 1000;

const EVENT_HINTS: Record<WebhookEvent, string> = {
  "job.succeeded": "a job finished with a result",
  "job.failed": "a job stopped with a problem",
  "job.cancelled": "a job was cancelled",
};

const STATE_TONES: Record<Delivery["state"], BadgeTone> = { delivered: "good", pending: "warn", failed: "bad" };

type Open =
  | { kind: "secret"; endpoint: Endpoint; secret: string; rotated: boolean }
  | { kind: "rotate"; endpoint: Endpoint }
  | { kind: "delete"; endpoint: Endpoint }
  | null;

const outcome = (status: number | null, error: string | null) =>
  status !== null ? `HTTP ${status}` : (error ?? "—");

export function WebhooksPanel() {
  const { data: me } = useMe();
  const manage = allows(me, "keys:manage");
  const queryClient = useQueryClient();
  const endpoints = useQuery({
    queryKey: WEBHOOKS_QUERY_KEY,
    queryFn: () => api<{ items: Endpoint[] }>("/webhooks"),
    enabled: manage,
  });
  const [open, setOpen] = useState<Open>(null);
  const [logOf, setLogOf] = useState<string | null>(null);
  const toggle = useMutation({
    mutationFn: (e: Endpoint) => api<Endpoint>(`/webhooks/${e.id}`, { method: "PATCH", body: { enabled: !e.enabled } }),
    onSuccess: () => void queryClient.invalidateQueries({ queryKey: WEBHOOKS_QUERY_KEY }),
  });

  if (me !== undefined && !manage) {
    return (
      <>
        <PageHeader title="Webhooks" />
        <Alert tone="info">Webhooks are for org admins only. Your role ({me.role ?? "—"}) cannot see or change them.</Alert>
      </>
    );
  }

  const columns: Column<Endpoint>[] = [
    {
      key: "url",
      header: "URL",
      className: "min-w-[14rem] max-w-[22rem]",
      cell: (e) => (
        <>
          <span className="break-all font-mono text-xs">{e.url}</span>
          {e.description !== "" && <span className="block text-xs text-graphite-muted">{e.description}</span>}
        </>
      ),
    },
    {
      key: "events",
      header: "Events",
      cell: (e) => <CodeBadges values={e.events} className="min-w-[8rem]" />,
    },
    {
      key: "status",
      header: "Status",
      className: "max-w-[12rem]",
      cell: (e) => (
        <>
          <Badge tone={e.enabled ? "good" : "bad"}>{e.enabled ? "Enabled" : "Disabled"}</Badge>
          {!e.enabled && e.disabledReason !== null && <span className="mt-0.5 block text-xs text-graphite-muted">{e.disabledReason}</span>}
          {e.previousSecretUntil !== null && Date.parse(e.previousSecretUntil) > Date.now() && (
            <span className="mt-0.5 block text-xs text-graphite-muted">
              previous secret signs too until {formatInstant(e.previousSecretUntil, false)}
            </span>
          )}
        </>
      ),
    },
    { key: "created", header: "Created", className: "whitespace-nowrap", cell: (e) => formatInstant(e.createdAt, false) },
    actionsColumn((e) => (
      <>
        <Button size="sm" aria-label={`Deliveries to ${e.url}`} aria-pressed={logOf === e.id} onClick={() => setLogOf(logOf === e.id ? null : e.id)}>
          Deliveries
        </Button>
        <Button size="sm" aria-label={`Rotate the secret of ${e.url}`} onClick={() => setOpen({ kind: "rotate", endpoint: e })}>
          Rotate secret
        </Button>
        <Button size="sm" aria-label={`${e.enabled ? "Disable" : "Enable"} ${e.url}`} disabled={toggle.isPending} onClick={() => toggle.mutate(e)}>
          {e.enabled ? "Disable" : "Enable"}
        </Button>
        <Button size="sm" aria-label={`Delete ${e.url}`} onClick={() => setOpen({ kind: "delete", endpoint: e })}>
          Delete
        </Button>
      </>
    )),
  ];
  const shown = endpoints.data?.items.find((e) => e.id === logOf);

  return (
    <>
      <PageHeader
        title="Webhooks"
        description="Endpoints this organisation's jobs notify when they end, signed as Standard Webhooks 1.0 so a receiver can check each message came from Rillscale."
      />
      <RegisterForm onRegistered={(endpoint, secret) => setOpen({ kind: "secret", endpoint, secret, rotated: false })} />
      {endpoints.error !== null && <Alert>{describeProblem(endpoints.error)}</Alert>}
      {toggle.error !== null && <Alert>{describeProblem(toggle.error)}</Alert>}
      {endpoints.data !== undefined && (
        <DataTable label="Webhook endpoints" columns={columns} rows={endpoints.data.items} rowKey={(e) => e.id} empty="No endpoints yet." />
      )}
      {endpoints.isPending && <p className="text-graphite-muted">Loading endpoints…</p>}
      {shown !== undefined && <DeliveryLog endpoint={shown} />}

      {open?.kind === "secret" && (
        <SecretDialog endpoint={open.endpoint} secret={open.secret} rotated={open.rotated} onClose={() => setOpen(null)} />
      )}
      {open?.kind === "rotate" && (
        <RotateDialog
          endpoint={open.endpoint}
          onClose={() => setOpen(null)}
          onRotated={(endpoint, secret) => setOpen({ kind: "secret", endpoint, secret, rotated: true })}
        />
      )}
      {open?.kind === "delete" && (
        <DeleteDialog
          endpoint={open.endpoint}
          onClose={(deleted) => {
            if (deleted && logOf === open.endpoint.id) setLogOf(null);
            setOpen(null);
          }}
        />
      )}
    </>
  );
}

function RegisterForm({ onRegistered }: { onRegistered: (endpoint: Endpoint, secret: string) => void }) {
  const queryClient = useQueryClient();
  const [url, setUrl] = useState("");
  const [description, setDescription] = useState("");
  const [events, setEvents] = useState<string[]>([...WEBHOOK_EVENTS]);
  const [errors, setErrors] = useState<FieldErrors>({});
  const register = useMutation({
    mutationFn: (body: z.infer<typeof WebhookCreateBody>) =>
      api<{ endpoint: Endpoint; secret: string }>("/webhooks", { method: "POST", body }),
    onSuccess: (r) => {
      void queryClient.invalidateQueries({ queryKey: WEBHOOKS_QUERY_KEY });
      setUrl("");
      setDescription("");
      onRegistered(r.endpoint, r.secret);
    },
    onError: (error) => setErrors(fieldErrorsOfProblem(error)),
  });

  function submit(event: FormEvent) {
    event.preventDefault();
    const checked = checkWith(WebhookCreateBody, { url, events, ...(description === "" ? {} : { description }) });
    setErrors(checked.ok ? {} : checked.errors);
    if (checked.ok) register.mutate(checked.data);
  }

  return (
    <form onSubmit={submit} noValidate className="card mb-5 flex flex-col gap-3 p-4" aria-label="Register an endpoint">
      <h2>Register an endpoint</h2>
      <div className="grid items-start gap-3 md:grid-cols-[2fr_1fr]">
        <TextField
          label="URL"
          type="url"
          placeholder="https://example.org/rillscale-hook"
          value={url}
          onChange={(e) => setUrl(e.target.value)}
          hint="Private, loopback and link-local addresses (10.0.0.0/8, 192.168.0.0/16, 127.0.0.1, localhost, 169.254.0.0/16 …) are refused unless the server runs with the development setting RILLSCALE_WEBHOOKS_ALLOW_PRIVATE."
          error={errors.url}
        />
        <TextField label="Description (optional)" value={description} onChange={(e) => setDescription(e.target.value)} error={errors.description} />
      </div>
      <CheckboxGroup
        legend="Events"
        subject="The endpoint"
        options={WEBHOOK_EVENTS.map((e) => ({ value: e, hint: EVENT_HINTS[e] }))}
        value={events}
        onChange={setEvents}
        error={errors.events}
      />
      <div className="flex items-center gap-3">
        <Button type="submit" variant="primary" disabled={register.isPending}>
          {register.isPending ? "Registering…" : "Register endpoint"}
        </Button>
        <span className="text-xs text-graphite-muted">
          Deliveries are retried with backoff until a 2xx answer; redirects are not followed and a 410 disables the endpoint.
        </span>
      </div>
      {register.error !== null && Object.keys(errors).length === 0 && <Alert>{describeProblem(register.error)}</Alert>}
    </form>
  );
}

function SecretDialog({ endpoint, secret, rotated, onClose }: { endpoint: Endpoint; secret: string; rotated: boolean; onClose: () => void }) {
  return (
    <OneTimeSecretDialog
      title={rotated ? "New signing secret" : "Endpoint registered"}
      secret={secret}
      warning="Copy the signing secret now. It is shown only once; the receiver needs it to verify the webhook-signature header."
      onClose={onClose}
    >
      <p className="break-all font-mono text-xs">{endpoint.url}</p>
      {rotated && endpoint.previousSecretUntil !== null && (
        <p className="text-graphite-muted">
          Until {formatInstant(endpoint.previousSecretUntil)} every delivery carries two signatures, one made with this secret
          and one with the previous, so the receiver can switch over without refusing a message.
        </p>
      )}
    </OneTimeSecretDialog>
  );
}

function RotateDialog({ endpoint, onClose, onRotated }: { endpoint: Endpoint; onClose: () => void; onRotated: (endpoint: Endpoint, secret: string) => void }) {
  return (
    <RotateSecretDialog<{ endpoint: Endpoint; secret: string }>
      title="Rotate the signing secret?"
      confirmLabel="Rotate secret"
      path={`/webhooks/${endpoint.id}/rotate-secret`}
      schema={WebhookRotateBody}
      hours={{ field: "overlapHours", label: "Overlap (hours)", hint: "0 stops signing with the previous secret at once.", initial: DEFAULT_OVERLAP_HOURS }}
      invalidates={WEBHOOKS_QUERY_KEY}
      onRotated={(r) => onRotated(r.endpoint, r.secret)}
      onClose={onClose}
    >
      <p className="break-all font-mono text-xs">{endpoint.url}</p>
      <p>
        A new secret is made and shown once. During the overlap both signatures are sent in the webhook-signature header,
        the new secret&apos;s and the previous one&apos;s, so a receiver still holding the old secret keeps accepting deliveries
        until it is updated.
      </p>
    </RotateSecretDialog>
  );
}

function DeleteDialog({ endpoint, onClose }: { endpoint: Endpoint; onClose: (deleted: boolean) => void }) {
  return (
    <ConfirmMutation
      title="Delete this endpoint?"
      confirmLabel="Delete endpoint"
      run={() => api<void>(`/webhooks/${endpoint.id}`, { method: "DELETE" })}
      invalidates={WEBHOOKS_QUERY_KEY}
      onDone={() => onClose(true)}
      onClose={() => onClose(false)}
    >
      <p className="break-all font-mono text-xs">{endpoint.url}</p>
      <p>No more deliveries are sent to it, and its delivery log is deleted with it. This cannot be undone.</p>
    </ConfirmMutation>
  );
}

function DeliveryLog({ endpoint }: { endpoint: Endpoint }) {
  const queryClient = useQueryClient();
  const key = [...WEBHOOKS_QUERY_KEY, endpoint.id, "deliveries"];
  const log = useQuery({
    queryKey: key,
    queryFn: () => api<{ items: Delivery[]; nextCursor: string | null }>(`/webhooks/${endpoint.id}/deliveries`),
    refetchInterval: (q) => (q.state.data?.items.some((d) => d.state === "pending") ? PENDING_REFRESH_MS : false),
  });
  const redeliver = useMutation({
    mutationFn: (d: Delivery) => api<Delivery>(`/webhooks/${endpoint.id}/deliveries/${d.id}/redeliver`, { method: "POST" }),
    onSuccess: () => void queryClient.invalidateQueries({ queryKey: key }),
  });

  const columns: Column<Delivery>[] = [
    { key: "time", header: "Time", className: "whitespace-nowrap", cell: (d) => formatInstantPrecise(d.createdAt, false) },
    { key: "event", header: "Event", className: "font-mono text-xs", cell: (d) => d.event },
    {
      key: "job",
      header: "Job",
      className: "font-mono text-xs",
      cell: (d) => (d.job === null ? "—" : <Link href={`/jobs/${d.job}`}>{d.job.slice(0, 8)}</Link>),
    },
    { key: "attempts", header: "Attempts", cell: (d) => d.attempts },
    {
      key: "result",
      header: "Result",
      className: "max-w-[16rem]",
      cell: (d) => (
        <>
          <Badge tone={STATE_TONES[d.state]}>{d.state}</Badge>{" "}
          <span className="font-mono text-xs" data-testid="delivery-outcome">
            {outcome(d.lastStatus, d.lastError)}
          </span>
          {d.state === "pending" && d.nextAttemptAt !== null && (
            <span className="block text-xs text-graphite-muted">next try {formatInstantPrecise(d.nextAttemptAt, false)}</span>
          )}
        </>
      ),
    },
    actionsColumn((d, state) => (
      <>
        <ExpandButton state={state} show="Attempts" hide="Hide attempts" />
        <Button size="sm" disabled={!endpoint.enabled || redeliver.isPending} onClick={() => redeliver.mutate(d)}>
          Redeliver
        </Button>
      </>
    )),
  ];

  return (
    <section className="mt-6 flex flex-col gap-2" aria-labelledby="deliveries-heading">
      <div className="flex flex-wrap items-baseline justify-between gap-2">
        <h2 id="deliveries-heading">
          Deliveries to <span className="break-all font-mono text-sm">{endpoint.url}</span>
        </h2>
        <Button size="sm" onClick={() => void log.refetch()} disabled={log.isFetching}>
          Refresh
        </Button>
      </div>
      <p className="text-xs text-graphite-muted">
        Newest first. Each delivery keeps one webhook-id over its retries; Redeliver sends the same message again as a new
        delivery{endpoint.enabled ? "" : " (enable the endpoint first)"}.
      </p>
      {redeliver.error !== null && <Alert>{describeProblem(redeliver.error)}</Alert>}
      {log.error !== null && <Alert>{describeProblem(log.error)}</Alert>}
      {log.data !== undefined && (
        <DataTable
          label="Deliveries"
          columns={columns}
          rows={log.data.items}
          rowKey={(d) => d.id}
          rowProps={(d) => ({ "data-delivery-id": d.id })}
          empty="Nothing sent yet: deliveries appear here when a job of this organisation ends."
          expansion={(d) => <AttemptLog endpointId={endpoint.id} deliveryId={d.id} />}
        />
      )}
      {log.isPending && <p className="text-graphite-muted">Loading deliveries…</p>}
    </section>
  );
}

function AttemptLog({ endpointId, deliveryId }: { endpointId: string; deliveryId: string }) {
  const detail = useQuery({
    queryKey: [...WEBHOOKS_QUERY_KEY, endpointId, "deliveries", deliveryId],
    queryFn: () => api<DeliveryDetail>(`/webhooks/${endpointId}/deliveries/${deliveryId}`),
  });
  if (detail.error !== null) return <Alert>{describeProblem(detail.error)}</Alert>;
  if (detail.data === undefined) return <p className="text-graphite-muted">Loading attempts…</p>;
  const columns: Column<DeliveryDetail["attemptLog"][number]>[] = [
    { key: "attempt", header: "Attempt", cell: (a) => a.attempt },
    { key: "at", header: "Time", className: "whitespace-nowrap", cell: (a) => formatInstantPrecise(a.at, false) },
    { key: "outcome", header: "Status or error", className: "font-mono text-xs", cell: (a) => outcome(a.status, a.error) },
    { key: "duration", header: "Duration", className: "whitespace-nowrap", cell: (a) => `${a.durationMs} ms` },
    { key: "response", header: "Response", className: "max-w-[18rem] break-all font-mono text-xs text-graphite-muted", cell: (a) => a.responseExcerpt || "—" },
  ];
  return (
    <div className="flex flex-col gap-1">
      <p className="font-mono text-xs text-graphite-muted">webhook-id {deliveryId}</p>
      <DataTable label={`Attempts of ${deliveryId}`} columns={columns} rows={detail.data.attemptLog} rowKey={(a) => String(a.attempt)} empty="Not tried yet." />
    </div>
  );
}
