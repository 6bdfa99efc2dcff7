// The job parameters as the OpenAPI document gives them to clients: every number bounded below and described,
// and every quantity named with its unit in both its name and its description.
import { describe, expect, it } from "vitest";
import { buildOpenApiDocument } from "@/openapi/registry";
import { JOB_KINDS } from "@/lib/jobs/kinds";

interface Schema {
  $ref?: string;
  type?: string | string[];
  description?: string;
  minimum?: number;
  exclusiveMinimum?: number;
  properties?: Record<string, Schema>;
  items?: Schema;
  anyOf?: Schema[];
  oneOf?: Schema[];
  allOf?: Schema[];
}

const doc = buildOpenApiDocument() as unknown as { components: { schemas: Record<string, Schema> } };

/** Every numeric property under a schema, with its property name and path. */
function numbers(s: Schema, path: string, name: string, out: { path: string; name: string; s: Schema }[] = []) {
  if (s.$ref) return numbers(doc.components.schemas[s.$ref.split("/").pop()!], path, name, out);
  const types = Array.isArray(s.type) ? s.type : [s.type]; // OpenAPI 3.1: a nullable number is ["number", "null"]
  if (types.includes("number") || types.includes("integer")) out.push({ path, name, s });
  for (const list of [s.anyOf, s.oneOf, s.allOf]) list?.forEach((x, i) => numbers(x, `${path}|${i}`, name, out));
  for (const [k, v] of Object.entries(s.properties ?? {})) numbers(v, `${path}.${k}`, k, out);
  if (s.items) numbers(s.items, `${path}[]`, name, out);
  return out;
}

describe("the job parameters in the OpenAPI document", () => {
  const kinds = JOB_KINDS.map((k) => `${k[0].toUpperCase()}${k.slice(1)}Params`);

  it("document each kind's parameters as a component (derived: the submission body points to them)", () => {
    for (const name of kinds) expect(doc.components.schemas[name], name).toBeDefined();
  });

  it("bound every number below and describe it; coordinates alone, in the data's own CRS, go unbounded (STANDARDS.md: clear errors for bad input)", () => {
    const all = kinds.flatMap((k) => numbers(doc.components.schemas[k], k, k));
    expect(all.length).toBeGreaterThan(20);
    for (const { path, s } of all) {
      expect(s.description, path).toBeTruthy();
      if (/CRS units/.test(s.description!)) continue;
      expect(s.minimum !== undefined || s.exclusiveMinimum !== undefined, `${path} has no lower bound`).toBe(true);
    }
  });

  it("name the unit of every quantity in its description as its name does: …M in m, …Km2 in km², …Cells in cells (platform brief: units everywhere)", () => {
    const all = kinds.flatMap((k) => numbers(doc.components.schemas[k], k, k));
    const units: [RegExp, RegExp][] = [[/[a-z]M$/, /, m(;|$)/], [/Km2$/, /km²/], [/Cells$/, /\bcells\b/]];
    let checked = 0;
    for (const { path, name, s } of all) {
      for (const [suffix, unit] of units) {
        if (!suffix.test(name)) continue;
        checked++;
        expect(s.description, path).toMatch(unit);
      }
    }
    expect(checked).toBeGreaterThan(10);
  });
});
