"use client";

import { useMutation } from "@tanstack/react-query";
import type { z } from "@/lib/api/schemas";
import type { ProvenanceVerifyBody, ProvenanceVerifyResult } from "@/lib/provenance/schemas";
import { api, apiBytes, describeProblem } from "@/components/data/api";
import type { ArtifactBody, DatasetBody } from "@/components/jobs/bodies";
import { SCREENING_CAUTION } from "@/components/shell/site-footer";
import { Alert } from "@/components/ui/alert";
import { Badge } from "@/components/ui/badge";
import { Button, LINK_BUTTON_CLASS } from "@/components/ui/button";
import { DataTable, type Column } from "@/components/ui/data-table";

type VerifyResult = z.infer<typeof ProvenanceVerifyResult>;

/** Artifacts larger than this are not re-hashed in the page (it holds each file in memory to hash it). */
const BROWSER_HASH_LIMIT_BYTES = 256 * 1024 * 1024;

interface HashedFile {
  name: string;
  /** Where the SHA-256 sent for checking came from. */
  source: string;
  sha256: string;
}

interface Outcome {
  result: VerifyResult;
  /** The `kid` of the JWS protected header, read here; the server's answer says whether it is published. */
  headerKid: string | null;
  documentSha256: string | null;
  hashed: HashedFile[];
  skipped: string[];
}

const hex = (buffer: ArrayBuffer) => Array.from(new Uint8Array(buffer), (b) => b.toString(16).padStart(2, "0")).join("");

function kidOfCompactJws(jws: string): string | null {
  try {
    const header = JSON.parse(atob(jws.split(".")[0]!.replace(/-/g, "+").replace(/_/g, "/"))) as { kid?: unknown };
    return typeof header.kid === "string" ? header.kid : null;
  } catch {
    return null;
  }
}

// SubtleCrypto exists only in a secure context (https or loopback); elsewhere the page checks the signature alone.
const subtle = () => (typeof crypto !== "undefined" && crypto.subtle !== undefined ? crypto.subtle : null);

async function verifyInPage(jobId: string, artifacts: readonly ArtifactBody[], dataset: DatasetBody | undefined): Promise<Outcome> {
  const base = `/jobs/${encodeURIComponent(jobId)}`;
  const [document, signature] = await Promise.all([apiBytes(`${base}/provenance`), apiBytes(`${base}/provenance.jws`)]);
  const jws = new TextDecoder().decode(signature).trim();
  const digest = subtle();
  const hashed: HashedFile[] = [];
  const skipped: string[] = [];
  if (dataset !== undefined) hashed.push({ name: dataset.name, source: "input: the dataset record's SHA-256", sha256: dataset.sha256 });
  for (const a of artifacts) {
    if (digest === null || a.sizeBytes > BROWSER_HASH_LIMIT_BYTES) {
      skipped.push(a.name);
      continue;
    }
    const bytes = await apiBytes(`${base}/artifacts/${encodeURIComponent(a.name)}`);
    hashed.push({ name: a.name, source: "artifact: downloaded and hashed in this page", sha256: hex(await digest.digest("SHA-256", bytes)) });
  }
  const body: z.input<typeof ProvenanceVerifyBody> = {
    document: new TextDecoder().decode(document),
    signature: jws,
    files: hashed.map((f) => ({ name: f.name, sha256: f.sha256 })),
  };
  const result = await api<VerifyResult>("/provenance/verify", { method: "POST", body });
  const documentSha256 = digest === null ? null : hex(await digest.digest("SHA-256", document));
  return { result, headerKid: kidOfCompactJws(jws), documentSha256, hashed, skipped };
}

/** A succeeded job's signed provenance: the two downloads, and a check of both against the published keys. */
export function ProvenanceSection({ jobId, artifacts, dataset }: { jobId: string; artifacts: readonly ArtifactBody[]; dataset: DatasetBody | undefined }) {
  const verify = useMutation({ mutationFn: () => verifyInPage(jobId, artifacts, dataset) });
  const base = `/api/v1/jobs/${jobId}`;
  return (
    <section className="card flex flex-col gap-3 p-4" aria-labelledby="provenance-heading">
      <h2 id="provenance-heading">Provenance</h2>
      <p className="text-dense text-graphite-muted">
        A W3C PROV-JSON document names this job&apos;s input, parameters, artifacts (each with its SHA-256), the software and who
        submitted it. It is signed with a detached JWS (RFC 7797, EdDSA); the public keys are at{" "}
        <a href="/.well-known/jwks.json" className="font-mono text-xs">
          /.well-known/jwks.json
        </a>
        . Every download is written to the audit log.
      </p>
      <div className="flex flex-wrap items-center gap-2">
        <a href={`${base}/provenance`} download={`provenance-${jobId}.json`} className={LINK_BUTTON_CLASS}>
          Download PROV-JSON
        </a>
        <a href={`${base}/provenance.jws`} download={`provenance-${jobId}.jws`} className={LINK_BUTTON_CLASS}>
          Download signature (JWS)
        </a>
        <Button variant="primary" onClick={() => verify.mutate()} disabled={verify.isPending}>
          {verify.isPending ? "Verifying…" : "Verify"}
        </Button>
      </div>
      {verify.error !== null && <Alert>{describeProblem(verify.error)}</Alert>}
      {verify.data !== undefined && <VerifyOutcome outcome={verify.data} />}
    </section>
  );
}

function VerifyOutcome({ outcome }: { outcome: Outcome }) {
  const { result } = outcome;
  const signatureValid = result.error === null;
  const checks = outcome.hashed.map((f) => ({ ...f, check: result.files.find((c) => c.name === f.name) }));
  const columns: Column<(typeof checks)[number]>[] = [
    { key: "file", header: "File", className: "font-mono text-xs", cell: (f) => f.name },
    { key: "source", header: "Hash from", className: "text-xs text-graphite-muted", cell: (f) => f.source },
    { key: "sha256", header: "SHA-256", className: "font-mono text-xs", cell: (f) => <span title={f.sha256}>{f.sha256.slice(0, 16)}…</span> },
    {
      key: "match",
      header: "In the document",
      cell: (f) =>
        f.check?.ok === true ? (
          <Badge tone="good">matches {f.check.entity}</Badge>
        ) : (
          <Badge tone="bad">no such hash</Badge>
        ),
    },
  ];
  return (
    <div className="flex flex-col gap-3" data-testid="provenance-verification">
      <Alert tone={result.valid ? "info" : "error"}>
        <span className="font-medium">{result.valid ? "Verified." : "Not verified."}</span>{" "}
        {signatureValid ? "The signature is valid for these exact document bytes" : `The signature does not verify: ${result.error}`}
        {signatureValid && (result.files.every((f) => f.ok) ? ", and every hash checked is in the document." : ", but a hash checked is not in the document.")}
      </Alert>
      <dl className="grid grid-cols-[10rem_minmax(0,1fr)] gap-y-1.5 text-dense">
        <dt className="text-graphite-muted">Signature</dt>
        <dd data-testid="signature-state">{signatureValid ? "valid (EdDSA, detached, unencoded payload)" : "invalid"}</dd>
        <dt className="text-graphite-muted">Signing key id</dt>
        <dd className="break-all font-mono text-xs" data-testid="signing-kid">
          {result.kid ?? outcome.headerKid ?? "—"}
        </dd>
        <dt className="text-graphite-muted">Job in the document</dt>
        <dd className="break-all font-mono text-xs">{result.job ?? "—"}</dd>
        <dt className="text-graphite-muted">Document SHA-256</dt>
        <dd className="break-all font-mono text-xs">{outcome.documentSha256 ?? "not computed (needs https or loopback)"}</dd>
      </dl>
      <DataTable label="Hashes checked" columns={columns} rows={checks} rowKey={(f) => f.name} empty="No file hashes were checked." utcCaption={false} />
      {outcome.skipped.length > 0 && (
        <p className="text-xs text-graphite-muted">
          Not re-hashed here: {outcome.skipped.join(", ")} (too large, or the page is not in a secure context). Check them with{" "}
          <span className="font-mono">npm run verify -- doc.json sig.jws file…</span>.
        </p>
      )}
      <p role="note" aria-label="Caution" className="text-xs text-graphite-muted">
        A valid signature shows the record is unaltered, not that the analysis fits a purpose. {SCREENING_CAUTION}
      </p>
    </div>
  );
}
