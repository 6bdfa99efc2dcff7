// The committed migrations match db/schema.ts: drizzle-kit, run into a copy of drizzle/, finds nothing to add.
import { spawnSync } from "node:child_process";
import { cpSync, readdirSync, rmSync } from "node:fs";
import path from "node:path";
import { afterAll, describe, expect, it } from "vitest";

const root = path.resolve(import.meta.dirname, "../../..");
// drizzle-kit reads `out` relative to the project (it prefixes "./"), so the copy lives inside .data.
const relCopy = path.join(".data", `drizzle-drift-${process.pid}`);
const copy = path.join(root, relCopy);
afterAll(() => rmSync(copy, { recursive: true, force: true }));

describe("migrations", () => {
  it("drizzle-kit generate finds no difference between db/schema.ts and drizzle/ (drizzle-kit docs: generate diffs against the last snapshot)", () => {
    cpSync(path.join(root, "drizzle"), copy, { recursive: true });
    const before = readdirSync(copy).sort();
    const r = spawnSync(process.execPath, [path.join(root, "node_modules/drizzle-kit/bin.cjs"), "generate"], {
      cwd: root, env: { ...process.env, DRIZZLE_OUT: relCopy }, encoding: "utf8",
    });
    expect(r.status, r.stderr).toBe(0);
    expect(r.stderr).not.toMatch(/Error/); // drizzle-kit exits 0 even when it fails
    expect(r.stdout).toMatch(/No schema changes/);
    expect(readdirSync(copy).sort()).toEqual(before);
  });
});
