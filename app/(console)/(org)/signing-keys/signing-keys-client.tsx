"use client";

import { useQuery } from "@tanstack/react-query";
import { useState } from "react";
import type { z } from "@/lib/api/schemas";
import type { SigningKey, SigningKeyRotation } from "@/lib/provenance/schemas";
import { api, describeProblem } from "@/components/data/api";
import { allows, useMe } from "@/components/data/use-me";
import { ConfirmMutation } from "@/components/forms/confirm-mutation";
import { formatInstant } from "@/components/format/instant";
import { Alert } from "@/components/ui/alert";
import { Badge } from "@/components/ui/badge";
import { Button } from "@/components/ui/button";
import { DataTable, type Column } from "@/components/ui/data-table";
import { PageHeader } from "@/components/ui/page-header";

type Key = z.infer<typeof SigningKey>;
type Rotation = z.infer<typeof SigningKeyRotation>;

const SIGNING_KEYS_QUERY_KEY = ["signing-keys"] as const;

const COLUMNS: Column<Key>[] = [
  { key: "kid", header: "Key id (RFC 7638 thumbprint)", className: "break-all font-mono text-xs", cell: (k) => k.kid },
  {
    key: "status",
    header: "Status",
    cell: (k) => <Badge tone={k.active ? "good" : "neutral"}>{k.active ? "Active" : "Retired"}</Badge>,
  },
  { key: "created", header: "Created", className: "whitespace-nowrap", cell: (k) => formatInstant(k.createdAt, false) },
  { key: "retired", header: "Retired", className: "whitespace-nowrap", cell: (k) => (k.retiredAt === null ? "—" : formatInstant(k.retiredAt, false)) },
];

export function SigningKeysPanel() {
  const { data: me } = useMe();
  const manage = allows(me, "keys:manage");
  const keys = useQuery({ queryKey: SIGNING_KEYS_QUERY_KEY, queryFn: () => api<{ items: Key[] }>("/signing-keys"), enabled: manage });
  const [confirming, setConfirming] = useState(false);
  const [rotated, setRotated] = useState<Rotation | null>(null);

  if (me !== undefined && !manage) {
    return (
      <>
        <PageHeader title="Signing keys" />
        <Alert tone="info">Signing keys are for org admins only. Your role ({me.role ?? "—"}) cannot see or rotate them.</Alert>
      </>
    );
  }

  return (
    <>
      <PageHeader
        title="Signing keys"
        description={
          <>
            The keys that sign every finished job&apos;s provenance document (EdDSA). A rotation makes a new key active; retired
            keys sign nothing more but stay published at <a href="/.well-known/jwks.json">/.well-known/jwks.json</a>, so documents
            signed earlier still verify. Keys are the server&apos;s, shared by every organisation on it.
          </>
        }
        actions={
          <Button variant="primary" onClick={() => setConfirming(true)}>
            Rotate now
          </Button>
        }
      />
      {rotated !== null && (
        <div className="mb-4">
          <Alert tone="info">
            Key <span className="font-mono text-xs">{rotated.active}</span> now signs new documents
            {rotated.retired.length > 0 ? `; ${rotated.retired.length} earlier key${rotated.retired.length === 1 ? "" : "s"} retired.` : "."}
          </Alert>
        </div>
      )}
      {keys.error !== null && <Alert>{describeProblem(keys.error)}</Alert>}
      {keys.data !== undefined && (
        <DataTable label="Signing keys" columns={COLUMNS} rows={keys.data.items} rowKey={(k) => k.kid} empty="No signing key yet: the worker makes one when it starts." />
      )}
      {keys.isPending && <p className="text-graphite-muted">Loading signing keys…</p>}
      {confirming && (
        <RotateDialog
          onClose={(r) => {
            if (r !== undefined) setRotated(r);
            setConfirming(false);
          }}
        />
      )}
    </>
  );
}

function RotateDialog({ onClose }: { onClose: (rotated?: Rotation) => void }) {
  return (
    <ConfirmMutation
      title="Rotate the signing key now?"
      confirmLabel="Rotate signing key"
      tone="primary"
      run={() => api<Rotation>("/signing-keys/rotate", { method: "POST" })}
      invalidates={SIGNING_KEYS_QUERY_KEY}
      onDone={onClose}
      onClose={() => onClose()}
    >
      <p>
        A new key signs every document from now on. The active key retires: its private half is destroyed, its public half stays
        published so its documents keep verifying. The rotation is written to the audit log.
      </p>
    </ConfirmMutation>
  );
}
