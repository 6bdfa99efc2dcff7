"use client";

import { useInfiniteQuery, useQueryClient } from "@tanstack/react-query";
import Link from "next/link";
import { useState } from "react";
import { api, describeProblem } from "@/components/data/api";
import { allows, useMe } from "@/components/data/use-me";
import { useRecentDatasets } from "@/components/datasets/use-datasets";
import { JOBS_QUERY_KEY, isLive, type JobBody, type JobKind, type Page } from "@/components/jobs/bodies";
import type { KindEntry } from "@/components/jobs/kind-catalog";
import { KIND_LABELS } from "@/components/jobs/kind-label";
import { JobStatusBadge, ProgressBar, formatDuration } from "@/components/jobs/job-status";
import { NewJobForm } from "@/components/jobs/new-job-form";
import { Alert } from "@/components/ui/alert";
import { Button } from "@/components/ui/button";
import { DataTable, InstantBy, type Column } from "@/components/ui/data-table";
import { SelectField } from "@/components/ui/field";
import { PageHeader } from "@/components/ui/page-header";

/** How often the table refreshes while any listed job is queued or running. */
const LIVE_REFRESH_MS = 1000;
const PAGE_SIZE = 50;

const STATUS_FILTERS = [
  { value: "", label: "Any status" },
  { value: "queued,running", label: "In progress" },
  { value: "queued", label: "Queued" },
  { value: "running", label: "Running" },
  { value: "succeeded", label: "Succeeded" },
  { value: "failed", label: "Failed" },
  { value: "cancelled", label: "Cancelled" },
];

export interface JobsPanelProps {
  catalog: KindEntry[];
  initialDataset?: string;
  initialStatus?: string;
}

function jobColumns(datasetNames: ReadonlyMap<string, string>): Column<JobBody>[] {
  return [
    {
      key: "kind",
      header: "Kind",
      className: "whitespace-nowrap font-medium",
      cell: (j) => (
        <>
          <Link href={`/jobs/${j.id}`} aria-label={`${KIND_LABELS[j.kind]} job ${j.id.slice(0, 8)}`}>
            {KIND_LABELS[j.kind]}
          </Link>
          <span className="block font-mono text-xs font-normal text-graphite-muted">{j.id.slice(0, 8)}</span>
        </>
      ),
    },
    {
      key: "dataset",
      header: "Dataset",
      className: "max-w-[16rem] break-all",
      cell: (j) =>
        j.dataset === null ? (
          <span className="text-graphite-muted">deleted</span>
        ) : (
          (datasetNames.get(j.dataset) ?? <span className="font-mono text-xs">{j.dataset.slice(0, 8)}</span>)
        ),
    },
    {
      key: "status",
      header: "Status",
      className: "whitespace-nowrap",
      cell: (j) => (
        <>
          <JobStatusBadge job={j} />
          {j.cachedFrom !== null && <span className="block text-xs text-graphite-muted">reused result</span>}
        </>
      ),
    },
    { key: "stage", header: "Stage", className: "whitespace-nowrap", cell: (j) => j.stage ?? "—" },
    { key: "progress", header: "Progress", cell: (j) => <ProgressBar value={j.progress} label={`Progress of job ${j.id.slice(0, 8)}`} /> },
    { key: "created", header: "Created", className: "whitespace-nowrap", cell: (j) => <InstantBy at={j.createdAt} by={j.submittedBy.label} /> },
    { key: "duration", header: "Duration", className: "whitespace-nowrap", cell: (j) => formatDuration(j.durationS) },
  ];
}

export function JobsPanel({ catalog, initialDataset, initialStatus }: JobsPanelProps) {
  const { data: me } = useMe();
  const write = allows(me, "jobs:write");
  const queryClient = useQueryClient();
  const [status, setStatus] = useState(STATUS_FILTERS.some((s) => s.value === initialStatus) ? (initialStatus ?? "") : "");
  const [kind, setKind] = useState<JobKind | "">("");
  const [formOpen, setFormOpen] = useState(initialDataset !== undefined);
  const [queued, setQueued] = useState<JobBody | null>(null);
  const datasets = useRecentDatasets();
  const datasetNames = new Map((datasets.data?.items ?? []).map((d) => [d.id, d.name]));

  const filter = new URLSearchParams({ limit: String(PAGE_SIZE), ...(status === "" ? {} : { status }), ...(kind === "" ? {} : { kind }) });
  const jobs = useInfiniteQuery({
    queryKey: [...JOBS_QUERY_KEY, "pages", status, kind],
    queryFn: ({ pageParam }) =>
      api<Page<JobBody>>(`/jobs?${filter}${pageParam === null ? "" : `&cursor=${encodeURIComponent(pageParam)}`}`),
    initialPageParam: null as string | null,
    getNextPageParam: (last) => last.nextCursor,
    refetchInterval: (query) =>
      query.state.data?.pages.some((p) => p.items.some((j) => isLive(j.status))) === true ? LIVE_REFRESH_MS : false,
  });
  const items = jobs.data?.pages.flatMap((p) => p.items) ?? [];

  return (
    <>
      <PageHeader
        title="Jobs"
        description="Analyses of this organisation's datasets. The table follows queued and running jobs as they progress."
        actions={
          write ? (
            <Button variant={formOpen ? "secondary" : "primary"} onClick={() => setFormOpen((o) => !o)} aria-expanded={formOpen}>
              {formOpen ? "Close the form" : "New analysis"}
            </Button>
          ) : undefined
        }
      />
      {write && formOpen && (
        <NewJobForm
          catalog={catalog}
          initialDataset={initialDataset}
          onQueued={(job) => {
            setQueued(job);
            void queryClient.invalidateQueries({ queryKey: JOBS_QUERY_KEY });
          }}
        />
      )}
      {queued !== null && (
        <div className="mb-4">
          <Alert tone="info">
            {queued.cachedFrom === null ? `${KIND_LABELS[queued.kind]} job queued.` : `${KIND_LABELS[queued.kind]} job answered from an earlier identical run.`}{" "}
            <Link href={`/jobs/${queued.id}`} data-job-id={queued.id}>
              Open the job
            </Link>
          </Alert>
        </div>
      )}
      <div className="mb-3 flex flex-wrap items-end gap-3">
        <div className="w-44">
          <SelectField label="Status" value={status} onChange={(e) => setStatus(e.target.value)} options={STATUS_FILTERS} />
        </div>
        <div className="w-44">
          <SelectField
            label="Kind"
            value={kind}
            onChange={(e) => setKind(e.target.value as JobKind | "")}
            options={[{ value: "", label: "Any kind" }, ...catalog.map((c) => ({ value: c.kind, label: KIND_LABELS[c.kind] }))]}
          />
        </div>
      </div>
      {jobs.error !== null && <Alert>{describeProblem(jobs.error)}</Alert>}
      {jobs.data !== undefined && (
        <DataTable
          label="Jobs"
          columns={jobColumns(datasetNames)}
          rows={items}
          rowKey={(j) => j.id}
          rowProps={(j) => ({ "data-job-id": j.id })}
          empty={status === "" && kind === "" ? "No jobs yet." : "No job matches these filters."}
        />
      )}
      {jobs.isPending && <p className="text-graphite-muted">Loading jobs…</p>}
      {jobs.hasNextPage && (
        <div className="mt-3">
          <Button onClick={() => void jobs.fetchNextPage()} disabled={jobs.isFetchingNextPage}>
            {jobs.isFetchingNextPage ? "Loading…" : "Load older jobs"}
          </Button>
        </div>
      )}
    </>
  );
}
