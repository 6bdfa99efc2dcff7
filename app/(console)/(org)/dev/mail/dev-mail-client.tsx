"use client";

import { useQuery } from "@tanstack/react-query";
import { Fragment } from "react";
import type { DevMailBody } from "@/lib/api/schemas";
import { ApiProblem, api, describeProblem } from "@/components/data/api";
import { formatInstantPrecise } from "@/components/format/instant";
import { Alert } from "@/components/ui/alert";
import { Button } from "@/components/ui/button";
import { DataTable, ExpandButton, actionsColumn, type Column } from "@/components/ui/data-table";
import { PageHeader } from "@/components/ui/page-header";

// Links in caught mail (invitations, resets) become clickable so a developer can follow a flow end to end.
const URL_PATTERN = /(https?:\/\/[^\s<>"]+)/g;

function Linked({ text }: { text: string }) {
  const parts = text.split(URL_PATTERN);
  return (
    <>
      {parts.map((part, i) =>
        i % 2 === 1 ? (
          <a key={i} href={part} className="break-all">
            {part}
          </a>
        ) : (
          <Fragment key={i}>{part}</Fragment>
        ),
      )}
    </>
  );
}

const MAIL_COLUMNS: Column<DevMailBody>[] = [
  { key: "received", header: "Received", className: "whitespace-nowrap", cell: (m) => formatInstantPrecise(m.receivedAt, false) },
  { key: "to", header: "To", cell: (m) => m.to.join(", ") },
  { key: "subject", header: "Subject", className: "font-medium", cell: (m) => m.subject },
  actionsColumn((_m, state) => <ExpandButton state={state} show="Read" hide="Hide" />, "Open"),
];

export function DevMailPanel() {
  const mail = useQuery({
    queryKey: ["dev-mail"],
    queryFn: () => api<{ items: DevMailBody[] }>("/dev/mail"),
    refetchInterval: 5_000,
  });
  const forbidden = mail.error instanceof ApiProblem && (mail.error.status === 403 || mail.error.status === 404);

  return (
    <>
      <PageHeader
        title="Dev mail"
        description="Messages caught by the local mail catcher instead of being delivered. Development servers only."
        actions={<Button onClick={() => void mail.refetch()}>Refresh</Button>}
      />
      {forbidden && <Alert tone="info">Caught mail is for org admins on a development server.</Alert>}
      {mail.error !== null && !forbidden && <Alert>{describeProblem(mail.error)}</Alert>}
      {mail.data !== undefined && (
        <DataTable
          label="Caught mail"
          columns={MAIL_COLUMNS}
          rows={mail.data.items}
          rowKey={(m) => m.id}
          empty="No mail caught yet."
          expansion={(m) => (
            <pre className="whitespace-pre-wrap font-mono text-xs leading-relaxed">
              <Linked text={m.text} />
            </pre>
          )}
        />
      )}
      {mail.isPending && <p className="text-graphite-muted">Loading mail…</p>}
    </>
  );
}
