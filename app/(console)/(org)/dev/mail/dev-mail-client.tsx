"use client";

import { useQuery } from "@tanstack/react-query";
import { Fragment, useState } from "react";
import type { DevMailBody } from "@/lib/api/schemas";
import { ApiProblem, api, describeProblem } from "@/components/data/api";
import { formatInstantPrecise } from "@/components/format/instant";
import { Alert } from "@/components/ui/alert";
import { Button } from "@/components/ui/button";
import { PageHeader } from "@/components/ui/page-header";
import { UtcCaption } from "@/components/ui/utc-caption";

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
        <div className="card overflow-x-auto">
          <table className="table-dense" aria-label="Caught mail">
            <UtcCaption />
            <thead>
              <tr>
                <th scope="col">Received</th>
                <th scope="col">To</th>
                <th scope="col">Subject</th>
                <th scope="col">
                  <span className="sr-only">Open</span>
                </th>
              </tr>
            </thead>
            <tbody>
              {mail.data.items.length === 0 && (
                <tr>
                  <td colSpan={4} className="py-6 text-center text-graphite-muted">
                    No mail caught yet.
                  </td>
                </tr>
              )}
              {mail.data.items.map((m) => (
                <Fragment key={m.id}>
                  <tr>
                    <td className="whitespace-nowrap">{formatInstantPrecise(m.receivedAt, false)}</td>
                    <td>{m.to.join(", ")}</td>
                    <td className="font-medium">{m.subject}</td>
                    <td className="text-right">
                      <Button
                        size="sm"
                        aria-expanded={openId === m.id}
                        aria-controls={`mail-${m.id}`}
                        onClick={() => setOpenId(openId === m.id ? null : m.id)}
                      >
                        {openId === m.id ? "Hide" : "Read"}
                      </Button>
                    </td>
                  </tr>
                  {openId === m.id && (
                    <tr id={`mail-${m.id}`}>
                      <td colSpan={4} className="bg-paper-sunk">
                        <pre className="whitespace-pre-wrap font-mono text-xs leading-relaxed">
                          <Linked text={m.text} />
                        </pre>
                      </td>
                    </tr>
                  )}
                </Fragment>
              ))}
            </tbody>
          </table>
        </div>
      )}
      {mail.isPending && <p className="text-graphite-muted">Loading mail…</p>}
    </>
  );
}
