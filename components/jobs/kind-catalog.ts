import "server-only";
// What the new-analysis form offers, read on the server from the job kinds (the pipelines' own parameter
// schemas: defaults by parsing {}, fields from their JSON Schema). The pipelines read files with node:fs, so
// the browser gets this plain description, never the schemas; the API validates what is sent.
import { z } from "zod";
import { JOB_KINDS, KINDS, type DatasetFormat, type JobKind } from "@/lib/jobs/kinds";

export type ParamInput = "number" | "integer" | "boolean" | "choice" | "json";

export interface ParamField {
  name: string;
  description: string;
  input: ParamInput;
  /** for "choice" */
  choices?: string[];
  /** the default as the schema fills it in; absent for optional parameters without one */
  defaultValue?: unknown;
}

export interface KindEntry {
  kind: JobKind;
  summary: string;
  formats: readonly DatasetFormat[];
  fields: ParamField[];
}

interface JsonSchemaProperty {
  type?: string;
  enum?: unknown[];
  description?: string;
}

function inputOf(p: JsonSchemaProperty): Pick<ParamField, "input" | "choices"> {
  if (p.enum !== undefined && p.enum.every((v) => typeof v === "string")) return { input: "choice", choices: p.enum as string[] };
  if (p.type === "number" || p.type === "integer" || p.type === "boolean") return { input: p.type };
  return { input: "json" };
}

export function kindCatalog(): KindEntry[] {
  return JOB_KINDS.map((kind) => {
    const schema = KINDS[kind].params;
    const defaults = schema.parse({}) as Record<string, unknown>;
    const json = z.toJSONSchema(schema, { io: "input", unrepresentable: "any" }) as { properties?: Record<string, JsonSchemaProperty> };
    const fields = Object.entries(json.properties ?? {}).map(([name, p]): ParamField => ({
      name,
      description: p.description ?? "",
      ...inputOf(p),
      ...(name in defaults ? { defaultValue: defaults[name] } : {}),
    }));
    return { kind, summary: KINDS[kind].summary, formats: KINDS[kind].formats, fields };
  });
}
