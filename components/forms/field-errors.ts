// Field messages for a form, from the same zod schema the API parses with (checked before sending)
// or from the API's problem document (what only the server can know, e.g. a taken e-mail).
import type { z } from "zod";
import { ApiProblem } from "@/components/data/api";

export type FieldErrors = Partial<Record<string, string>>;

export type Checked<T> = { ok: true; data: T } | { ok: false; errors: FieldErrors };

// Our schemas word their messages as predicates ("must be an e-mail address"); zod's own defaults are
// developer sentences ("Too small: expected string to have >=1 characters"), so those are reworded.
function messageOf(issue: z.core.$ZodIssue): string {
  if (/^[a-z]/.test(issue.message)) return issue.message;
  switch (issue.code) {
    case "too_small":
      if (issue.origin === "string") return Number(issue.minimum) <= 1 ? "is required" : `must be at least ${issue.minimum} characters`;
      return issue.origin === "array" ? `needs at least ${issue.minimum}` : `must be at least ${issue.minimum}`;
    case "too_big":
      return issue.origin === "string" ? `must be at most ${issue.maximum} characters` : `must be at most ${issue.maximum}`;
    case "invalid_type":
      return `is missing or not a ${issue.expected}`;
    default:
      return issue.message;
  }
}

/** Parses `values` with `schema`; the first message per top-level field. */
export function checkWith<S extends z.ZodType>(schema: S, values: unknown): Checked<z.output<S>> {
  const result = schema.safeParse(values);
  if (result.success) return { ok: true, data: result.data };
  const errors: FieldErrors = {};
  for (const issue of result.error.issues) {
    const field = String(issue.path[0] ?? "form");
    errors[field] ??= messageOf(issue);
  }
  return { ok: false, errors };
}

/** Field messages from a 422 problem's `errors[]` (JSON pointers such as "/email"). */
export function fieldErrorsOfProblem(error: unknown): FieldErrors {
  if (!(error instanceof ApiProblem)) return {};
  const errors: FieldErrors = {};
  for (const e of error.errors) {
    const field = e.pointer.replace(/^\//, "").split("/")[0] || "form";
    errors[field] ??= e.detail;
  }
  return errors;
}
