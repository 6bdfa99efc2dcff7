"use client";

import { useMutation, useQueryClient } from "@tanstack/react-query";
import Link from "next/link";
import { useRef, useState, type FormEvent } from "react";
import { ApiProblem, api, describeProblem } from "@/components/data/api";
import { allows, useMe } from "@/components/data/use-me";
import {
  FORMAT_LABELS,
  crsName,
  describeBbox,
  describeCellSize,
  describeCrs,
  describeExtent,
  formatBytes,
  metadataRows,
  uploadMediaType,
} from "@/components/datasets/describe";
import { uploadDataset, type UploadProgress } from "@/components/datasets/upload-file";
import { DATASETS_QUERY_KEY, useDatasetPages } from "@/components/datasets/use-datasets";
import { formatInstant } from "@/components/format/instant";
import type { DatasetBody } from "@/components/jobs/bodies";
import { ProgressBar } from "@/components/jobs/job-status";
import { Alert } from "@/components/ui/alert";
import { Badge } from "@/components/ui/badge";
import { Button, LINK_BUTTON_CLASS } from "@/components/ui/button";
import { ConfirmDialog } from "@/components/ui/confirm-dialog";
import { DataTable, InstantBy, actionsColumn, type Column } from "@/components/ui/data-table";
import { Dialog } from "@/components/ui/dialog";
import { TextField } from "@/components/ui/field";
import { PageHeader } from "@/components/ui/page-header";

type Open = { kind: "details"; dataset: DatasetBody } | { kind: "delete"; dataset: DatasetBody } | null;

function datasetColumns({ write, analyse, setOpen }: { write: boolean; analyse: boolean; setOpen: (o: Open) => void }): Column<DatasetBody>[] {
  return [
    {
      key: "name",
      header: "Name",
      className: "min-w-[8rem] font-medium",
      cell: (d) => (
        <>
          <span className="break-all">{d.name}</span>
          <span className="block text-xs font-normal text-graphite-muted">{describeExtent(d.metadata)}</span>
        </>
      ),
    },
    { key: "kind", header: "Kind", className: "whitespace-nowrap", cell: (d) => FORMAT_LABELS[d.format] },
    { key: "crs", header: "CRS", className: "whitespace-nowrap", cell: (d) => <span title={crsName(d.metadata)}>{describeCrs(d.metadata)}</span> },
    { key: "size", header: "Size", className: "whitespace-nowrap", cell: (d) => formatBytes(d.sizeBytes) },
    { key: "cell", header: "Cell size", className: "whitespace-nowrap", cell: (d) => describeCellSize(d.metadata) },
    { key: "bbox", header: "Bounding box (lon/lat)", className: "whitespace-nowrap font-mono text-xs", cell: (d) => <BboxCell metadata={d.metadata} /> },
    { key: "uploaded", header: "Uploaded", className: "whitespace-nowrap", cell: (d) => <InstantBy at={d.createdAt} by={d.createdBy.label} /> },
    actionsColumn((d) => (
      <>
        <Button size="sm" aria-label={`Details of ${d.name}`} onClick={() => setOpen({ kind: "details", dataset: d })}>
          Details
        </Button>
        {analyse && (
          <Link href={`/jobs?dataset=${encodeURIComponent(d.id)}`} aria-label={`Analyse ${d.name}`} className={LINK_BUTTON_CLASS}>
            Analyse
          </Link>
        )}
        {write && (
          <Button size="sm" aria-label={`Delete ${d.name}`} onClick={() => setOpen({ kind: "delete", dataset: d })}>
            Delete
          </Button>
        )}
      </>
    )),
  ];
}

export function DatasetsPanel() {
  const { data: me } = useMe();
  const write = allows(me, "datasets:write");
  const analyse = allows(me, "jobs:write");
  const pages = useDatasetPages();
  const [open, setOpen] = useState<Open>(null);
  const items = pages.data?.pages.flatMap((p) => p.items) ?? [];

  return (
    <>
      <PageHeader
        title="Datasets"
        description="DEMs (GeoTIFF) and mapped stream lines (GeoJSON, zipped shapefile). Each file is checked before it is accepted; the same bytes uploaded twice are one dataset."
      />
      {write ? (
        <UploadPanel />
      ) : (
        <div className="mb-4">
          <Alert tone="info">Your role ({me?.role ?? "—"}) can read datasets but not upload or delete them.</Alert>
        </div>
      )}
      {pages.error !== null && <Alert>{describeProblem(pages.error)}</Alert>}
      {pages.data !== undefined && (
        <DataTable label="Datasets" columns={datasetColumns({ write, analyse, setOpen })} rows={items} rowKey={(d) => d.id} empty="No datasets yet." />
      )}
      {pages.isPending && <p className="text-graphite-muted">Loading datasets…</p>}
      {pages.hasNextPage && (
        <div className="mt-3">
          <Button onClick={() => void pages.fetchNextPage()} disabled={pages.isFetchingNextPage}>
            {pages.isFetchingNextPage ? "Loading…" : "Load older datasets"}
          </Button>
        </div>
      )}
      {open?.kind === "details" && <DetailsDialog dataset={open.dataset} onClose={() => setOpen(null)} />}
      {open?.kind === "delete" && <DeleteDialog dataset={open.dataset} onClose={() => setOpen(null)} />}
    </>
  );
}

function BboxCell({ metadata }: { metadata: Record<string, unknown> }) {
  const box = describeBbox(metadata);
  if (box === null) return <>—</>;
  return (
    <>
      <span className="block" title="south-west corner">{box.southWest}</span>
      <span className="block" title="north-east corner">{box.northEast}</span>
    </>
  );
}

type UploadState =
  | { phase: "idle" }
  | { phase: "sending"; progress: UploadProgress }
  | { phase: "done"; dataset: DatasetBody; created: boolean }
  | { phase: "failed"; error: unknown };

function UploadPanel() {
  const queryClient = useQueryClient();
  const fileInput = useRef<HTMLInputElement>(null);
  const abort = useRef<AbortController | null>(null);
  const [file, setFile] = useState<File | null>(null);
  const [epsg, setEpsg] = useState("");
  const [fieldError, setFieldError] = useState<{ file?: string; epsg?: string }>({});
  const [state, setState] = useState<UploadState>({ phase: "idle" });

  async function submit(event: FormEvent) {
    event.preventDefault();
    const mediaType = file === null ? undefined : uploadMediaType(file.name);
    const epsgCode = epsg.trim() === "" ? undefined : Number(epsg);
    const errors = {
      ...(file === null ? { file: "File is required" } : mediaType === undefined ? { file: "File must end in .tif, .tiff, .geojson, .json or .zip" } : {}),
      ...(epsgCode !== undefined && !(Number.isInteger(epsgCode) && epsgCode >= 1024) ? { epsg: "EPSG code must be a whole number from 1024" } : {}),
    };
    setFieldError(errors);
    if (file === null || mediaType === undefined || Object.keys(errors).length > 0) return;
    abort.current = new AbortController();
    setState({ phase: "sending", progress: { sent: 0, total: file.size } });
    try {
      const result = await uploadDataset(file, mediaType, epsgCode, (progress) => setState({ phase: "sending", progress }), abort.current.signal);
      setState({ phase: "done", ...result });
      setFile(null);
      if (fileInput.current !== null) fileInput.current.value = "";
      void queryClient.invalidateQueries({ queryKey: DATASETS_QUERY_KEY });
    } catch (error) {
      setState({ phase: "failed", error });
    } finally {
      abort.current = null;
    }
  }

  const sending = state.phase === "sending";
  const checking = sending && state.progress.sent >= state.progress.total;

  return (
    <form onSubmit={submit} noValidate className="card mb-5 flex flex-col gap-3 p-4" aria-label="Upload a dataset">
      <h2>Upload a dataset</h2>
      <div className="grid gap-3 md:grid-cols-[minmax(0,2fr)_minmax(0,1fr)_auto] md:items-start">
        <div>
          <label htmlFor="dataset-file" className="label">
            File
          </label>
          <input
            id="dataset-file"
            ref={fileInput}
            type="file"
            accept=".tif,.tiff,.geojson,.json,.zip"
            disabled={sending}
            aria-invalid={fieldError.file !== undefined}
            aria-describedby={fieldError.file !== undefined ? "dataset-file-error" : "dataset-file-hint"}
            onChange={(e) => setFile(e.target.files?.[0] ?? null)}
            className="input file:mr-3 file:rounded file:border-0 file:bg-paper-sunk file:px-2 file:py-0.5 file:text-dense"
          />
          {fieldError.file === undefined ? (
            <p id="dataset-file-hint" className="mt-1 text-xs text-graphite-muted">
              A GeoTIFF DEM, GeoJSON lines, or a zipped shapefile of lines.
            </p>
          ) : (
            <p id="dataset-file-error" className="mt-1 text-xs text-rust">
              {fieldError.file}
            </p>
          )}
        </div>
        <TextField
          label="EPSG code (optional)"
          inputMode="numeric"
          value={epsg}
          disabled={sending}
          onChange={(e) => setEpsg(e.target.value)}
          hint="Only when the file states no CRS, or a wrong one."
          error={fieldError.epsg}
        />
        <div className="flex gap-2 md:pt-6">
          <Button type="submit" variant="primary" disabled={sending}>
            {sending ? "Uploading…" : "Upload"}
          </Button>
          {sending && (
            <Button onClick={() => abort.current?.abort()} disabled={checking}>
              Cancel upload
            </Button>
          )}
        </div>
      </div>
      {sending && (
        <div className="flex flex-col gap-1">
          <ProgressBar value={state.progress.total > 0 ? state.progress.sent / state.progress.total : 0} label="Upload progress" />
          <p className="text-xs text-graphite-muted" role="status">
            {checking
              ? "Sent. The server is checking the file…"
              : `${formatBytes(state.progress.sent)} of ${formatBytes(state.progress.total)} sent`}
          </p>
        </div>
      )}
      {state.phase === "done" && (
        <Alert tone="info">
          {state.created
            ? `Uploaded “${state.dataset.name}”: ${FORMAT_LABELS[state.dataset.format]}, ${describeExtent(state.dataset.metadata)}, ${describeCrs(state.dataset.metadata)}.`
            : `These bytes were already uploaded as “${state.dataset.name}”; that dataset is used.`}
        </Alert>
      )}
      {state.phase === "failed" && <Alert>{describeProblem(state.error)}</Alert>}
    </form>
  );
}

function DetailsDialog({ dataset, onClose }: { dataset: DatasetBody; onClose: () => void }) {
  return (
    <Dialog open title={dataset.name} onClose={onClose} actions={<Button onClick={onClose}>Close</Button>}>
      <dl className="grid grid-cols-[auto_minmax(0,1fr)] gap-x-4 gap-y-1 text-dense">
        <dt className="text-graphite-muted">Kind</dt>
        <dd>{FORMAT_LABELS[dataset.format]}</dd>
        <dt className="text-graphite-muted">Media type</dt>
        <dd className="font-mono text-xs">{dataset.mediaType}</dd>
        <dt className="text-graphite-muted">Size</dt>
        <dd>
          {formatBytes(dataset.sizeBytes)} ({dataset.sizeBytes.toLocaleString("en")} bytes)
        </dd>
        <dt className="text-graphite-muted">SHA-256</dt>
        <dd className="break-all font-mono text-xs">{dataset.sha256}</dd>
        <dt className="text-graphite-muted">Uploaded</dt>
        <dd>
          {formatInstant(dataset.createdAt)} by {dataset.createdBy.label}
        </dd>
        <dt className="text-graphite-muted">Id</dt>
        <dd className="break-all font-mono text-xs">{dataset.id}</dd>
      </dl>
      <h3 className="text-dense font-semibold">Metadata read from the file</h3>
      <dl className="grid max-h-72 grid-cols-[auto_minmax(0,1fr)] gap-x-4 gap-y-1 overflow-y-auto text-dense">
        {metadataRows(dataset.metadata).map((row) => (
          <div key={row.label} className="contents">
            <dt className="font-mono text-xs text-graphite-muted">{row.label}</dt>
            <dd className="break-all font-mono text-xs">{row.value}</dd>
          </div>
        ))}
      </dl>
    </Dialog>
  );
}

function DeleteDialog({ dataset, onClose }: { dataset: DatasetBody; onClose: () => void }) {
  const queryClient = useQueryClient();
  const remove = useMutation({
    mutationFn: () => api<void>(`/datasets/${encodeURIComponent(dataset.id)}`, { method: "DELETE" }),
    onSuccess: () => {
      void queryClient.invalidateQueries({ queryKey: DATASETS_QUERY_KEY });
      onClose();
    },
  });
  const inUse = remove.error instanceof ApiProblem && remove.error.status === 409;
  return (
    <ConfirmDialog
      open
      title={`Delete “${dataset.name}”?`}
      confirmLabel="Delete dataset"
      pending={remove.isPending}
      error={inUse ? null : remove.error}
      onConfirm={() => remove.mutate()}
      onClose={onClose}
    >
      <p>
        The file is removed from storage. Finished analyses keep their results and artifacts; they no longer name the
        dataset.
      </p>
      {inUse && (
        <Alert>
          <span className="font-medium">Still in use.</span> {(remove.error as ApiProblem).detail ?? "A queued or running analysis reads this dataset."}{" "}
          <Link href="/jobs?status=queued,running">See the analyses in progress</Link>.
        </Alert>
      )}
      <p className="text-xs text-graphite-muted">
        <Badge>{FORMAT_LABELS[dataset.format]}</Badge> {formatBytes(dataset.sizeBytes)}
      </p>
    </ConfirmDialog>
  );
}
