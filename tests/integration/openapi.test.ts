// The served OpenAPI document is valid OpenAPI 3.1, lists exactly the route handlers under app/api/v1, and
// carries the screening-analysis caution.
import { readFileSync, readdirSync, statSync } from "node:fs";
import path from "node:path";
import { Validator } from "@seriousme/openapi-schema-validator";
import { describe, expect, it } from "vitest";
import { api } from "@/tests/integration/client";

const API_DIR = path.resolve(import.meta.dirname, "../../app/api/v1");
const METHODS = ["GET", "POST", "PUT", "PATCH", "DELETE"];

/** "METHOD /api/v1/path" for every exported handler, from the file tree ([param] → {param}). */
function routesOnDisk(dir = API_DIR): string[] {
  const out: string[] = [];
  for (const name of readdirSync(dir)) {
    const p = path.join(dir, name);
    if (statSync(p).isDirectory()) out.push(...routesOnDisk(p));
    else if (name === "route.ts") {
      const url = "/api/v1/" + path.relative(API_DIR, dir).split(path.sep).map((s) => s.replace(/^\[(.+)\]$/, "{$1}")).join("/");
      const src = readFileSync(p, "utf8");
      for (const m of METHODS) if (new RegExp(`export const ${m}\\b|export async function ${m}\\b`).test(src)) out.push(`${m} ${url.replace(/\/$/, "")}`);
    }
  }
  return out.sort();
}

describe("GET /api/v1/openapi.json", () => {
  it("validates as OpenAPI 3.1 (@seriousme/openapi-schema-validator, OpenAPI Initiative schema)", async () => {
    const doc = await (await api("/api/v1/openapi.json")).json();
    const v = new Validator();
    const r = await v.validate(doc as Parameters<Validator["validate"]>[0]);
    expect(r.errors ?? []).toEqual([]);
    expect(r.valid).toBe(true);
    expect(v.version).toBe("3.1");
  });

  it("lists every route handler under app/api/v1 and nothing else (derived from the file tree)", async () => {
    const doc = (await (await api("/api/v1/openapi.json")).json()) as { paths: Record<string, Record<string, unknown>> };
    const documented = Object.entries(doc.paths).flatMap(([p, ops]) => Object.keys(ops).map((m) => `${m.toUpperCase()} ${p}`)).sort();
    const onDisk = routesOnDisk();
    expect(onDisk.length).toBeGreaterThanOrEqual(20);
    expect(documented).toEqual(onDisk);
  });

  it("states the screening-analysis caution and documents every problem type (platform brief; RFC 9457)", async () => {
    const doc = (await (await api("/api/v1/openapi.json")).json()) as { info: { description: string } };
    expect(doc.info.description).toContain("screening analysis, not a substitute for licensed engineering judgment; defer to local codes");
    const problem = (await (await api("/api/v1/keys")).json()) as { type: string };
    expect(doc.info.description).toContain(problem.type);
  });
});
