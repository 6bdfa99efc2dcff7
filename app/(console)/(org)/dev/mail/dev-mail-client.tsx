"use client";

import { useQuery } from "@tanstack/react-query";
import { Fragment, useState } from "react";
import type { DevMailBody } from "@/lib/api/schemas";
import { ApiProblem, api, describeProblem } from "@/components/data/api";
import { formatInstantPrecise } from "@/components/format/instant";
import { Alert } from "@/components/ui/alert";
import { Button } from "@/components/ui/button";
import { DataTable, actionsColumn, type Column } from "@/components/ui/data-table";
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

export function DevMailPanel() {
  const mail = useQuery({
    queryKey: ["dev-mail"],
    queryFn: () => api<{ items: DevMailBody[] }>("/dev/mail"),
    refetchInterval: 5_000,
  });
  const [openId, setOpenId] = useState<string | null>(null);
  const forbidden = mail.error instanceof ApiProblem && (mail.error.status === 403 || mail.error.status === 404);
  const columns: Column<DevMailBody>[] = [
    { key: "received", header: "Received", className: "whitespace-nowrap", cell: (m) => formatInstantPrecise(m.receivedAt, false) },
    { key: "to", header: "To", cell: (m) => m.to.join(", ") },
    { key: "subject", header: "Subject", className: "font-medium", cell: (m) => m.subject },
    actionsColumn(
      (m) => (
        <Button size="sm" aria-expanded={openId === m.id} aria-controls={`mail-${m.id}`} onClick={() => setOpenId(openId === m.id ? null : m.id)}>
          {openId === m.id ? "Hide" : "Read"}
        </Button>
      ),
      "Open",
    ),
  ];

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
          columns={columns}
          rows={mail.data.items}
          rowKey={(m) => m.id}
          empty="No mail caught yet."
          expansion={(m) =>
            openId === m.id ? (
              <pre id={`mail-${m.id}`} className="whitespace-pre-wrap font-mono text-xs leading-relaxed">
                <Linked text={m.text} />
              </pre>
            ) : null
          }
        />
      )}
      {mail.isPending && <p className="text-graphite-muted">Loading mail…</p>}
    </>
  );
}
