"use client";

// The new-analysis form: a dataset, a kind, and that kind's parameters with their defaults filled in. The
// parameter schemas live in the pipelines, which read files with node:fs and cannot be bundled for the browser,
// so this form only checks what a field's type demands (a number, JSON) and the API's 422 names the rest.
import { useMutation } from "@tanstack/react-query";
import { useEffect, useState, type FormEvent } from "react";
import { ApiProblem, api, describeProblem } from "@/components/data/api";
import { FORMAT_LABELS } from "@/components/datasets/describe";
import { useRecentDatasets } from "@/components/datasets/use-datasets";
import type { FieldErrors } from "@/components/forms/field-errors";
import type { JobBody, JobKind } from "@/components/jobs/bodies";
import type { KindEntry, ParamField } from "@/components/jobs/kind-catalog";
import { KIND_LABELS } from "@/components/jobs/kind-label";
import { Alert } from "@/components/ui/alert";
import { Button } from "@/components/ui/button";
import { SelectField, TextField } from "@/components/ui/field";

type Values = Record<string, string | boolean>;

function initialValues(fields: ParamField[]): Values {
  return Object.fromEntries(
    fields.map((f) => {
      const d = f.defaultValue;
      if (f.input === "boolean") return [f.name, d === true];
      if (d === undefined) return [f.name, ""];
      return [f.name, f.input === "json" ? JSON.stringify(d) : String(d)];
    }),
  );
}

/** Form values → params; an empty field is left out, so the pipeline's default (or absence) applies. */
function paramsOf(fields: ParamField[], values: Values): { params: Record<string, unknown>; errors: FieldErrors } {
  const params: Record<string, unknown> = {};
  const errors: FieldErrors = {};
  for (const f of fields) {
    const v = values[f.name];
    if (typeof v === "boolean") {
      params[f.name] = v;
      continue;
    }
    const text = (v ?? "").trim();
    if (text === "") continue;
    if (f.input === "number" || f.input === "integer") {
      const n = Number(text);
      if (!Number.isFinite(n) || (f.input === "integer" && !Number.isInteger(n))) errors[f.name] = `must be ${f.input === "integer" ? "a whole number" : "a number"}`;
      else params[f.name] = n;
    } else if (f.input === "json") {
      try {
        params[f.name] = JSON.parse(text);
      } catch {
        errors[f.name] = "must be JSON, e.g. {\"method\": \"area\", \"km2\": 1}";
      }
    } else {
      params[f.name] = text;
    }
  }
  return { params, errors };
}

/** A 422's pointers (/params/channelThreshold/km2, /dataset) → the form's fields. */
function errorsOfProblem(error: unknown): FieldErrors {
  if (!(error instanceof ApiProblem)) return {};
  const errors: FieldErrors = {};
  for (const e of error.errors) {
    const [first, second] = e.pointer.replace(/^\//, "").split("/");
    const field = first === "params" && second !== undefined ? second : first || "form";
    const rest = e.pointer.split("/").slice(3).join(".");
    errors[field] ??= rest === "" ? e.detail : `${rest}: ${e.detail}`;
  }
  return errors;
}

export interface NewJobFormProps {
  catalog: KindEntry[];
  initialDataset?: string;
  onQueued: (job: JobBody) => void;
}

export function NewJobForm({ catalog, initialDataset, onQueued }: NewJobFormProps) {
  const datasets = useRecentDatasets();
  const [kind, setKind] = useState<JobKind>(catalog[0].kind);
  const entry = catalog.find((c) => c.kind === kind) ?? catalog[0];
  const [dataset, setDataset] = useState(initialDataset ?? "");
  const [values, setValues] = useState<Values>(() => initialValues(entry.fields));
  const [errors, setErrors] = useState<FieldErrors>({});

  // A dataset picked on the datasets page ("Analyse") selects the first kind that reads its format, once.
  const [kindMatched, setKindMatched] = useState(initialDataset === undefined);
  useEffect(() => {
    if (kindMatched || datasets.data === undefined) return;
    setKindMatched(true);
    const format = datasets.data.items.find((d) => d.id === initialDataset)?.format;
    const fitting = catalog.find((c) => format !== undefined && c.formats.includes(format));
    if (fitting !== undefined && fitting.kind !== kind) chooseKind(fitting.kind);
  });

  const usable = (datasets.data?.items ?? []).filter((d) => entry.formats.includes(d.format));
  const chosen = usable.find((d) => d.id === dataset) === undefined ? "" : dataset;

  const submit = useMutation({
    mutationFn: (body: { dataset: string; kind: JobKind; params: Record<string, unknown> }) =>
      api<JobBody>("/jobs", { method: "POST", body }),
    onSuccess: (job) => {
      setErrors({});
      onQueued(job);
    },
    onError: (error) => setErrors(errorsOfProblem(error)),
  });

  function chooseKind(next: JobKind) {
    const nextEntry = catalog.find((c) => c.kind === next) ?? catalog[0];
    setKind(next);
    setValues(initialValues(nextEntry.fields));
    setErrors({});
  }

  function send(event: FormEvent) {
    event.preventDefault();
    const { params, errors: found } = paramsOf(entry.fields, values);
    if (chosen === "") found.dataset = "is required: choose a dataset";
    setErrors(found);
    if (Object.keys(found).length === 0) submit.mutate({ dataset: chosen, kind, params });
  }

  const unplaced = Object.entries(errors).filter(([k]) => k !== "dataset" && k !== "kind" && !entry.fields.some((f) => f.name === k));

  return (
    <form onSubmit={send} noValidate className="card mb-5 flex flex-col gap-4 p-4" aria-label="New analysis">
      <h2>New analysis</h2>
      <div className="grid gap-3 md:grid-cols-2">
        <SelectField
          label="Kind"
          value={kind}
          onChange={(e) => chooseKind(e.target.value as JobKind)}
          options={catalog.map((c) => ({ value: c.kind, label: KIND_LABELS[c.kind] }))}
          hint={entry.summary}
          error={errors.kind}
        />
        <SelectField
          label="Dataset"
          value={chosen}
          onChange={(e) => setDataset(e.target.value)}
          options={[
            { value: "", label: usable.length === 0 ? `No ${entry.formats.map((f) => FORMAT_LABELS[f]).join(" or ")} uploaded` : "Choose a dataset…" },
            ...usable.map((d) => ({ value: d.id, label: `${d.name} (${FORMAT_LABELS[d.format]})` })),
          ]}
          hint={`Reads ${entry.formats.map((f) => FORMAT_LABELS[f]).join(" or ")}.`}
          error={errors.dataset}
        />
      </div>
      <fieldset className="flex flex-col gap-2">
        <legend className="label">Parameters</legend>
        <p className="-mt-1 text-xs text-graphite-muted">
          Filled in with the defaults. Leave a field empty to use its default; structured ones take JSON.
        </p>
        <div className="grid gap-3 md:grid-cols-2 xl:grid-cols-3">
          {entry.fields.map((f) => (
            <ParamInput
              key={`${kind}-${f.name}`}
              field={f}
              value={values[f.name]}
              error={errors[f.name]}
              onChange={(v) => setValues((prev) => ({ ...prev, [f.name]: v }))}
            />
          ))}
        </div>
      </fieldset>
      {unplaced.length > 0 && <Alert>{unplaced.map(([k, m]) => `${k}: ${m}`).join("; ")}</Alert>}
      {submit.error !== null && !(submit.error instanceof ApiProblem && submit.error.errors.length > 0) && (
        <Alert>{describeProblem(submit.error)}</Alert>
      )}
      <div>
        <Button type="submit" variant="primary" disabled={submit.isPending}>
          {submit.isPending ? "Starting…" : "Start analysis"}
        </Button>
      </div>
    </form>
  );
}

function ParamInput({
  field,
  value,
  error,
  onChange,
}: {
  field: ParamField;
  value: string | boolean | undefined;
  error: string | undefined;
  onChange: (v: string | boolean) => void;
}) {
  if (field.input === "boolean") {
    return (
      <div>
        <label className="flex items-start gap-2 text-sm">
          <input type="checkbox" className="mt-0.5 accent-lichen" checked={value === true} onChange={(e) => onChange(e.target.checked)} />
          <span>
            <span className="font-mono text-dense">{field.name}</span>
            <span className="block text-xs text-graphite-muted">{field.description}</span>
          </span>
        </label>
        {error !== undefined && <p className="mt-1 text-xs text-rust">{`${field.name} ${error}`}</p>}
      </div>
    );
  }
  if (field.input === "choice") {
    const options = (field.choices ?? []).map((c) => ({ value: c, label: c }));
    return (
      <SelectField
        label={field.name}
        value={typeof value === "string" ? value : ""}
        onChange={(e) => onChange(e.target.value)}
        options={field.defaultValue === undefined ? [{ value: "", label: "(not set)" }, ...options] : options}
        hint={field.description}
        error={error}
      />
    );
  }
  return (
    <TextField
      label={field.name}
      value={typeof value === "string" ? value : ""}
      onChange={(e) => onChange(e.target.value)}
      inputMode={field.input === "json" ? "text" : "decimal"}
      placeholder={field.defaultValue === undefined ? "not set" : undefined}
      className={field.input === "json" ? "font-mono text-xs" : ""}
      hint={field.description}
      error={error}
    />
  );
}
