"use client";

import Link from "next/link";
import type { Permission } from "@/lib/auth/permissions";
import { useMe } from "@/components/data/use-me";
import { PageHeader } from "@/components/ui/page-header";

// What each permission means to a person, in the words the console uses elsewhere.
const PERMISSION_WORDS: Record<Permission, string> = {
  "keys:manage": "create, rotate and revoke API keys",
  "members:manage": "invite members and change their roles",
  "audit:read": "read the audit log",
  "datasets:write": "upload and delete datasets",
  "jobs:write": "queue and cancel analyses",
  "jobs:read": "follow analyses",
  "results:read": "read and download results",
  "provenance:read": "download signed provenance",
  "mail:read-dev": "read mail caught by the development server",
};

export function OverviewPanel() {
  const { data: me } = useMe();
  if (me === undefined) return null;
  return (
    <>
      <PageHeader title={me.org.name} description={`Signed in as ${me.user?.name ?? me.user?.email ?? "—"}.`} />
      <div className="grid items-start gap-5 md:grid-cols-2">
        <section className="card p-5" aria-labelledby="role-heading">
          <h2 id="role-heading">Your role: {me.role ?? "—"}</h2>
          <p className="mb-2 mt-1 text-graphite-muted">You may:</p>
          <ul className="list-disc space-y-0.5 pl-5">
            {me.permissions.map((p) => (
              <li key={p}>{PERMISSION_WORDS[p]}</li>
            ))}
          </ul>
        </section>
        <section className="card p-5" aria-labelledby="api-heading">
          <h2 id="api-heading">Scripting the API</h2>
          <p className="mt-1 text-graphite-muted">
            Scripts authenticate with an API key in the <code>Authorization: Bearer</code> header. Every route, its
            parameters and its errors are in the <Link href="/docs">API reference</Link>.
          </p>
          <dl className="mt-3 grid grid-cols-[auto_1fr] gap-x-4 gap-y-1 text-dense">
            <dt className="text-graphite-muted">Organisation</dt>
            <dd className="font-mono">{me.org.slug}</dd>
            <dt className="text-graphite-muted">Base path</dt>
            <dd className="font-mono">/api/v1</dd>
          </dl>
        </section>
      </div>
    </>
  );
}
