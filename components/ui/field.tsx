"use client";

import { useId, type InputHTMLAttributes, type ReactNode, type SelectHTMLAttributes } from "react";

interface FieldShellProps {
  id: string;
  label: string;
  hint?: ReactNode;
  error?: string;
  children: ReactNode;
}

// Label, hint and error wired to the control by id, so screen readers (and tests) find them by label.
function FieldShell({ id, label, hint, error, children }: FieldShellProps) {
  return (
    <div>
      <label htmlFor={id} className="label">
        {label}
      </label>
      {children}
      {hint !== undefined && error === undefined && (
        <p id={`${id}-hint`} className="mt-1 text-xs text-graphite-muted">
          {hint}
        </p>
      )}
      {error !== undefined && (
        <p id={`${id}-error`} className="mt-1 text-xs text-rust">
          {sentence(label, error)}
        </p>
      )}
    </div>
  );
}

// Our schemas word messages as predicates ("must be an e-mail address"); zod's defaults are sentences.
function sentence(label: string, message: string): string {
  return /^[a-z]/.test(message) ? `${label} ${message}` : message;
}

function describedBy(id: string, hint: ReactNode, error: string | undefined): string | undefined {
  if (error !== undefined) return `${id}-error`;
  return hint !== undefined ? `${id}-hint` : undefined;
}

export interface TextFieldProps extends Omit<InputHTMLAttributes<HTMLInputElement>, "id"> {
  label: string;
  hint?: ReactNode;
  error?: string;
}

export function TextField({ label, hint, error, className = "", ...input }: TextFieldProps) {
  const id = useId();
  return (
    <FieldShell id={id} label={label} hint={hint} error={error}>
      <input
        id={id}
        className={`input ${className}`}
        aria-invalid={error !== undefined}
        aria-describedby={describedBy(id, hint, error)}
        {...input}
      />
    </FieldShell>
  );
}

export interface SelectFieldProps extends Omit<SelectHTMLAttributes<HTMLSelectElement>, "id"> {
  label: string;
  hint?: ReactNode;
  error?: string;
  options: readonly { value: string; label: string }[];
}

export function SelectField({ label, hint, error, options, className = "", ...select }: SelectFieldProps) {
  const id = useId();
  return (
    <FieldShell id={id} label={label} hint={hint} error={error}>
      <select
        id={id}
        className={`input ${className}`}
        aria-invalid={error !== undefined}
        aria-describedby={describedBy(id, hint, error)}
        {...select}
      >
        {options.map((o) => (
          <option key={o.value} value={o.value}>
            {o.label}
          </option>
        ))}
      </select>
    </FieldShell>
  );
}

export interface CheckboxGroupProps {
  legend: string;
  /** What an error message is about, when not the legend ("The key" needs at least one scope). */
  subject?: string;
  options: readonly { value: string; hint?: string }[];
  value: readonly string[];
  onChange: (next: string[]) => void;
  error?: string;
}

export function CheckboxGroup({ legend, subject = legend, options, value, onChange, error }: CheckboxGroupProps) {
  const id = useId();
  return (
    <fieldset aria-describedby={error === undefined ? undefined : `${id}-error`}>
      <legend className="label">{legend}</legend>
      <div className="grid grid-cols-2 gap-x-4 gap-y-1.5">
        {options.map((o) => (
          <label key={o.value} className="flex items-start gap-2 text-sm">
            <input
              type="checkbox"
              className="mt-0.5 accent-lichen"
              checked={value.includes(o.value)}
              onChange={(e) =>
                onChange(e.target.checked ? [...value, o.value] : value.filter((v) => v !== o.value))
              }
            />
            <span>
              <span className="font-mono text-dense">{o.value}</span>
              {o.hint !== undefined && <span className="block text-xs text-graphite-muted">{o.hint}</span>}
            </span>
          </label>
        ))}
      </div>
      {error !== undefined && (
        <p id={`${id}-error`} className="mt-1 text-xs text-rust">
          {sentence(subject, error)}
        </p>
      )}
    </fieldset>
  );
}
