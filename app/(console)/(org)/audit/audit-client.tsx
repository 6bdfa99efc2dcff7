"use client";

import { keepPreviousData, useMutation, useQuery } from "@tanstack/react-query";
import { useState, type FormEvent } from "react";
import { AuditQuery, type AuditEventBody, type AuditQueryInput } from "@/lib/api/schemas";
import { ApiProblem, api, describeProblem } from "@/components/data/api";
import { checkWith, type FieldErrors } from "@/components/forms/field-errors";
import { formatInstant, formatInstantPrecise } from "@/components/format/instant";
import { Alert } from "@/components/ui/alert";
import { Badge } from "@/components/ui/badge";
import { Button } from "@/components/ui/button";
import { DataTable, type Column } from "@/components/ui/data-table";
import { TextField } from "@/components/ui/field";
import { PageHeader } from "@/components/ui/page-header";

const PAGE_SIZE = 50;

type AuditList = { items: AuditEventBody[]; nextCursor: string | null };
type AuditVerify = { ok: boolean; checked: number; firstBadId?: string };
type Filters = Omit<AuditQueryInput, "limit" | "cursor">;

interface FilterDraft {
  action: string;
  actor: string;
  from: string;
  to: string;
}
const EMPTY_DRAFT: FilterDraft = { action: "", actor: "", from: "", to: "" };

/** Dates from the form as whole UTC days: "from" at the day's start, "to" at its end. */
function draftToQuery(draft: FilterDraft): Record<string, string> {
  const q: Record<string, string> = {};
  if (draft.action.trim() !== "") q.action = draft.action.trim();
  if (draft.actor.trim() !== "") q.actor = draft.actor.trim();
  if (draft.from !== "") q.from = `${draft.from}T00:00:00.000Z`;
  if (draft.to !== "") q.to = `${draft.to}T23:59:59.999Z`;
  return q;
}

function auditPath(filters: Filters, cursor: string | undefined): string {
  const params = new URLSearchParams({ limit: String(PAGE_SIZE) });
  for (const [k, v] of Object.entries(filters)) if (typeof v === "string") params.set(k, v);
  if (cursor !== undefined) params.set("cursor", cursor);
  return `/audit?${params.toString()}`;
}

export function AuditPanel() {
  const [draft, setDraft] = useState<FilterDraft>(EMPTY_DRAFT);
  const [errors, setErrors] = useState<FieldErrors>({});
  const [filters, setFilters] = useState<Filters>({});
  // Cursors of the pages before the current one, so "Newer" can step back without the API paging backwards.
  const [cursors, setCursors] = useState<(string | undefined)[]>([undefined]);
  const cursor = cursors[cursors.length - 1];

  const page = useQuery({
    queryKey: ["audit", filters, cursor],
    queryFn: () => api<AuditList>(auditPath(filters, cursor)),
    placeholderData: keepPreviousData,
  });
  const verify = useMutation({ mutationFn: () => api<AuditVerify>("/audit/verify") });
  const forbidden = page.error instanceof ApiProblem && page.error.status === 403;

  function apply(event: FormEvent) {
    event.preventDefault();
    const checked = checkWith(AuditQuery, draftToQuery(draft));
    setErrors(checked.ok ? {} : checked.errors);
    if (!checked.ok) return;
    const { action, actor, from, to } = checked.data;
    setFilters({ action, actor, from, to });
    setCursors([undefined]);
  }

  function clear() {
    setDraft(EMPTY_DRAFT);
    setErrors({});
    setFilters({});
    setCursors([undefined]);
  }

  return (
    <>
      <PageHeader
        title="Audit log"
        description="Every sign-in, key and membership change, newest first. Rows cannot be edited or deleted; each carries the hash of the one before it."
        actions={
          <Button onClick={() => verify.mutate()} disabled={verify.isPending || forbidden}>
            {verify.isPending ? "Verifying…" : "Verify chain"}
          </Button>
        }
      />
      {verify.data !== undefined && (
        <div className="mb-4">
          <Alert tone={verify.data.ok ? "info" : "error"}>
            {verify.data.ok
              ? `Chain intact: ${verify.data.checked} entries checked.`
              : `Chain broken at entry ${verify.data.firstBadId ?? "?"} (${verify.data.checked} checked).`}
          </Alert>
        </div>
      )}
      {verify.error !== null && (
        <div className="mb-4">
          <Alert>{describeProblem(verify.error)}</Alert>
        </div>
      )}

      <form onSubmit={apply} noValidate className="card mb-4 p-4" aria-label="Filter audit entries">
        <div className="grid items-start gap-3 md:grid-cols-[1fr_1fr_10rem_10rem_auto]">
          <TextField
            label="Action"
            placeholder="e.g. api_key.created"
            value={draft.action}
            onChange={(e) => setDraft({ ...draft, action: e.target.value })}
            error={errors.action}
          />
          <TextField
            label="Actor"
            placeholder="e-mail or key prefix"
            value={draft.actor}
            onChange={(e) => setDraft({ ...draft, actor: e.target.value })}
            error={errors.actor}
          />
          <TextField
            label="From (UTC)"
            type="date"
            value={draft.from}
            onChange={(e) => setDraft({ ...draft, from: e.target.value })}
            error={errors.from}
          />
          <TextField
            label="To (UTC)"
            type="date"
            value={draft.to}
            onChange={(e) => setDraft({ ...draft, to: e.target.value })}
            error={errors.to}
          />
          <div className="flex gap-2 md:mt-5">
            <Button type="submit" variant="primary">
              Filter
            </Button>
            <Button onClick={clear}>Clear</Button>
          </div>
        </div>
      </form>

      {forbidden && <Alert tone="info">Your role cannot read the audit log.</Alert>}
      {page.error !== null && !forbidden && <Alert>{describeProblem(page.error)}</Alert>}
      {page.data !== undefined && (
        <>
          <DataTable
            label="Audit entries"
            columns={AUDIT_COLUMNS}
            rows={page.data.items}
            rowKey={(event) => String(event.id)}
            empty="No entries match."
            busy={page.isFetching}
          />
          <nav aria-label="Audit pages" className="mt-3 flex items-center justify-between text-dense text-graphite-muted">
            <span>
              Page {cursors.length}
              {page.data.items.length > 0 &&
                ` · ${formatInstant(page.data.items[0]!.at)} to ${formatInstant(page.data.items[page.data.items.length - 1]!.at)}`}
            </span>
            <div className="flex gap-2">
              <Button size="sm" disabled={cursors.length === 1} onClick={() => setCursors(cursors.slice(0, -1))}>
                Newer
              </Button>
              <Button
                size="sm"
                disabled={page.data.nextCursor === null || page.isPlaceholderData}
                onClick={() => {
                  const next = page.data?.nextCursor;
                  if (next !== null && next !== undefined) setCursors([...cursors, next]);
                }}
              >
                Older
              </Button>
            </div>
          </nav>
        </>
      )}
      {page.isPending && <p className="text-graphite-muted">Loading entries…</p>}
    </>
  );
}

const AUDIT_COLUMNS: Column<AuditEventBody>[] = [
  { key: "time", header: "Time", className: "whitespace-nowrap", cell: (event) => <span title={event.at}>{formatInstantPrecise(event.at, false)}</span> },
  {
    key: "action",
    header: "Action",
    cell: (event) => (
      <Badge tone={/fail|refus|denied/.test(event.action) ? "bad" : "neutral"}>
        <span className="font-mono">{event.action}</span>
      </Badge>
    ),
  },
  {
    key: "actor",
    header: "Actor",
    cell: (event) => (
      <>
        <span className="block whitespace-nowrap">{event.actor.label}</span>
        <span className="text-xs text-graphite-muted">{event.actor.kind.replace("_", " ")}</span>
      </>
    ),
  },
  {
    key: "target",
    header: "Target",
    className: "max-w-[10rem] truncate font-mono text-xs",
    cell: (event) => <span title={event.target ?? undefined}>{event.target ?? "—"}</span>,
  },
  { key: "ip", header: "IP", className: "whitespace-nowrap font-mono text-xs", cell: (event) => event.ip ?? "—" },
  // One line per detail, wrapped rather than cut: details are what an auditor reads the row for.
  {
    key: "details",
    header: "Details",
    className: (event) => (Object.keys(event.details).length === 0 ? "text-graphite-muted" : "min-w-[14rem] max-w-[22rem] font-mono text-xs text-graphite-soft"),
    cell: (event) => {
      const entries = Object.entries(event.details);
      if (entries.length === 0) return "—";
      return entries.map(([k, v]) => (
        <span key={k} className="block break-words">
          <span className="text-graphite-muted">{k}=</span>
          {typeof v === "string" ? v : JSON.stringify(v)}
        </span>
      ));
    },
  },
];
