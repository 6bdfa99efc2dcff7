"use client";

import { useMutation, useQuery, useQueryClient } from "@tanstack/react-query";
import Link from "next/link";
import type { DrainageSummary } from "@/lib/pipelines/drainage";
import type { NetworkSummary } from "@/lib/pipelines/network";
import { ApiProblem, api, describeProblem } from "@/components/data/api";
import { allows, useMe } from "@/components/data/use-me";
import { formatBytes } from "@/components/datasets/describe";
import { DATASETS_QUERY_KEY } from "@/components/datasets/use-datasets";
import { formatInstant } from "@/components/format/instant";
import {
  JOBS_QUERY_KEY,
  isLive,
  type ArtifactBody,
  type DatasetBody,
  type JobBody,
  type JobResultBody,
} from "@/components/jobs/bodies";
import { DrainageResult } from "@/components/jobs/drainage-result";
import { FractalResult, type FractalSummary } from "@/components/jobs/fractal-result";
import { JobStatusBadge, ProgressBar, formatDuration } from "@/components/jobs/job-status";
import { KIND_LABELS } from "@/components/jobs/kind-label";
import { NetworkResult } from "@/components/jobs/network-result";
import { ProvenanceSection } from "@/components/jobs/provenance-section";
import { Alert } from "@/components/ui/alert";
import { Button, LINK_BUTTON_CLASS } from "@/components/ui/button";
import { DataTable, actionsColumn, type Column } from "@/components/ui/data-table";
import { PageHeader } from "@/components/ui/page-header";

/** How often the page refreshes while the job is queued or running. */
const LIVE_REFRESH_MS = 1000;

export function JobDetail({ id }: { id: string }) {
  const { data: me } = useMe();
  const queryClient = useQueryClient();
  const path = `/jobs/${encodeURIComponent(id)}`;
  const job = useQuery({
    queryKey: [...JOBS_QUERY_KEY, "one", id],
    queryFn: () => api<JobBody>(path),
    refetchInterval: (query) => (query.state.data !== undefined && isLive(query.state.data.status) ? LIVE_REFRESH_MS : false),
  });
  const succeeded = job.data?.status === "succeeded";
  const readResults = allows(me, "results:read");
  const result = useQuery({
    queryKey: [...JOBS_QUERY_KEY, "result", id],
    queryFn: () => api<JobResultBody>(`${path}/result`),
    enabled: succeeded && readResults,
    staleTime: Infinity,
  });
  const artifacts = useQuery({
    queryKey: [...JOBS_QUERY_KEY, "artifacts", id],
    queryFn: () => api<{ items: ArtifactBody[] }>(`${path}/artifacts`),
    enabled: succeeded && readResults,
    staleTime: Infinity,
  });
  const datasetId = job.data?.dataset ?? null;
  const dataset = useQuery({
    queryKey: [...DATASETS_QUERY_KEY, "one", datasetId],
    queryFn: () => api<DatasetBody>(`/datasets/${encodeURIComponent(datasetId ?? "")}`),
    enabled: datasetId !== null,
    staleTime: Infinity,
  });
  const cancel = useMutation({
    mutationFn: () => api<JobBody>(`${path}/cancel`, { method: "POST" }),
    onSuccess: () => void queryClient.invalidateQueries({ queryKey: JOBS_QUERY_KEY }),
  });

  if (job.error !== null) {
    const missing = job.error instanceof ApiProblem && job.error.status === 404;
    return (
      <>
        <PageHeader title="Job" />
        <Alert>{missing ? "There is no such job in this organisation." : describeProblem(job.error)}</Alert>
        <p className="mt-3">
          <Link href="/jobs">Back to the jobs</Link>
        </p>
      </>
    );
  }
  if (job.data === undefined) return <p className="text-graphite-muted">Loading the job…</p>;
  const j = job.data;
  const live = isLive(j.status);

  return (
    <div className="flex flex-col gap-5">
      <PageHeader
        title={`${KIND_LABELS[j.kind]} job`}
        description={
          <>
            <Link href="/jobs">Jobs</Link> / <span className="font-mono text-xs">{j.id}</span>
          </>
        }
        actions={
          live && allows(me, "jobs:write") ? (
            <Button variant="danger" onClick={() => cancel.mutate()} disabled={cancel.isPending || j.cancelRequested}>
              {j.cancelRequested ? "Cancelling…" : "Cancel job"}
            </Button>
          ) : undefined
        }
      />
      {cancel.error !== null && <Alert>{describeProblem(cancel.error)}</Alert>}

      <section className="card grid gap-x-8 gap-y-3 p-4 md:grid-cols-2" aria-label="Job status">
        <dl className="grid grid-cols-[8rem_minmax(0,1fr)] gap-y-1.5 text-dense">
          <dt className="text-graphite-muted">Status</dt>
          <dd data-testid="job-status">
            <JobStatusBadge job={j} />
            {j.cachedFrom !== null && (
              <span className="ml-2 text-xs text-graphite-muted">
                result reused from <Link href={`/jobs/${j.cachedFrom}`}>an identical earlier run</Link>
              </span>
            )}
          </dd>
          <dt className="text-graphite-muted">Stage</dt>
          <dd>{j.stage ?? "—"}</dd>
          <dt className="text-graphite-muted">Progress</dt>
          <dd>
            <ProgressBar value={j.progress} label="Job progress" />
          </dd>
          <dt className="text-graphite-muted">Dataset</dt>
          <dd className="break-all">
            {j.dataset === null ? "deleted" : (dataset.data?.name ?? <span className="font-mono text-xs">{j.dataset}</span>)}
          </dd>
        </dl>
        <dl className="grid grid-cols-[8rem_minmax(0,1fr)] gap-y-1.5 text-dense">
          <dt className="text-graphite-muted">Submitted</dt>
          <dd>
            {formatInstant(j.createdAt)} by {j.submittedBy.label}
          </dd>
          <dt className="text-graphite-muted">Started</dt>
          <dd>{formatInstant(j.startedAt)}</dd>
          <dt className="text-graphite-muted">Finished</dt>
          <dd>{formatInstant(j.finishedAt)}</dd>
          <dt className="text-graphite-muted">Duration</dt>
          <dd>
            {formatDuration(j.durationS)}
            {j.attempts > 1 && <span className="ml-2 text-xs text-graphite-muted">{j.attempts} attempts</span>}
          </dd>
        </dl>
      </section>

      {j.status === "failed" && j.error !== null && <JobError problem={j.error} />}

      <section className="card p-4" aria-labelledby="params-heading">
        <h2 id="params-heading" className="mb-2">
          Parameters
        </h2>
        <p className="mb-2 text-xs text-graphite-muted">As run, with the defaults filled in.</p>
        <dl className="grid grid-cols-1 gap-x-6 gap-y-1 text-dense sm:grid-cols-[minmax(10rem,auto)_minmax(0,1fr)]">
          {Object.entries(j.params).map(([k, v]) => (
            <div key={k} className="contents">
              <dt className="font-mono text-xs text-graphite-muted">{k}</dt>
              <dd className="break-all font-mono text-xs">{JSON.stringify(v)}</dd>
            </div>
          ))}
        </dl>
      </section>

      {succeeded && !readResults && <Alert tone="info">Your role cannot read results.</Alert>}
      {artifacts.data !== undefined && <Downloads artifacts={artifacts.data.items} />}
      {artifacts.error !== null && <Alert>{describeProblem(artifacts.error)}</Alert>}
      {artifacts.data !== undefined && allows(me, "provenance:read") && (
        <ProvenanceSection jobId={j.id} artifacts={artifacts.data.items} dataset={dataset.data} />
      )}
      {result.error !== null && <Alert>{describeProblem(result.error)}</Alert>}
      {result.isPending && succeeded && readResults && <p className="text-graphite-muted">Loading the result…</p>}
      {result.data !== undefined && <ResultView result={result.data} />}
    </div>
  );
}

function ResultView({ result }: { result: JobResultBody }) {
  const summary = result.summary;
  return (
    <>
      {result.kind === "drainage" && <DrainageResult summary={summary as unknown as DrainageSummary} />}
      {(result.kind === "surface" || result.kind === "line") && <FractalResult summary={summary as unknown as FractalSummary} />}
      {result.kind === "network" && <NetworkResult summary={summary as unknown as NetworkSummary} />}
      <section className="card p-4">
        <h2 className="mb-1">The whole summary</h2>
        <p className="text-xs text-graphite-muted">
          Computed by {result.software.name} {result.software.version}. Units are in the key suffixes (M, M2, Km, Km2, PerKm)
          or stated beside each estimator. The same JSON is at{" "}
          <a href={`/api/v1/jobs/${result.job}/result`} className="font-mono">
            /api/v1/jobs/{result.job.slice(0, 8)}…/result
          </a>
          .
        </p>
        <details className="mt-2">
          <summary className="cursor-pointer text-dense text-lichen-deep">Show the summary as JSON</summary>
          <pre className="mt-2 max-h-96 overflow-auto rounded bg-paper-sunk p-3 font-mono text-xs">{JSON.stringify(summary, null, 2)}</pre>
        </details>
        {Object.keys(result.timingsS).length > 0 && (
          <p className="mt-2 text-xs text-graphite-muted">
            Stage times:{" "}
            {Object.entries(result.timingsS)
              .map(([stage, s]) => `${stage} ${formatDuration(s)}`)
              .join(", ")}
          </p>
        )}
      </section>
    </>
  );
}

const ARTIFACT_COLUMNS: Column<ArtifactBody>[] = [
  { key: "file", header: "File", className: "font-mono text-xs", cell: (a) => a.name },
  { key: "type", header: "Type", className: "font-mono text-xs text-graphite-muted", cell: (a) => a.mediaType },
  { key: "size", header: "Size", className: "whitespace-nowrap", cell: (a) => formatBytes(a.sizeBytes) },
  { key: "sha256", header: "SHA-256", className: "font-mono text-xs text-graphite-muted", cell: (a) => <span title={a.sha256}>{a.sha256.slice(0, 16)}…</span> },
  actionsColumn(
    (a) => (
      <a href={a.href} download={a.name} aria-label={`Download ${a.name}`} className={LINK_BUTTON_CLASS}>
        Download
      </a>
    ),
    "Download",
  ),
];

function Downloads({ artifacts }: { artifacts: ArtifactBody[] }) {
  return (
    <section aria-labelledby="downloads-heading" className="flex flex-col gap-2">
      <h2 id="downloads-heading">Downloads</h2>
      <DataTable label="Artifacts" columns={ARTIFACT_COLUMNS} rows={artifacts} rowKey={(a) => a.name} empty="This job wrote no files." utcCaption={false} />
    </section>
  );
}

/** A failed job's problem document: what went wrong, in the API's own words. */
function JobError({ problem }: { problem: Record<string, unknown> }) {
  const text = (k: string) => (typeof problem[k] === "string" || typeof problem[k] === "number" ? String(problem[k]) : undefined);
  const errors = Array.isArray(problem.errors) ? (problem.errors as { pointer?: string; detail?: string }[]) : [];
  return (
    <section aria-label="Why the job failed">
      <Alert>
        <p className="font-medium">{text("title") ?? "The job failed"}</p>
        {text("detail") !== undefined && <p className="mt-1">{text("detail")}</p>}
        {errors.length > 0 && (
          <ul className="mt-1 list-disc pl-5">
            {errors.map((e, i) => (
              <li key={i}>
                <span className="font-mono text-xs">{e.pointer}</span> {e.detail}
              </li>
            ))}
          </ul>
        )}
        <p className="mt-1 font-mono text-xs opacity-80">
          {[text("type"), text("status") === undefined ? undefined : `status ${text("status")}`].filter(Boolean).join(" · ")}
        </p>
      </Alert>
    </section>
  );
}
