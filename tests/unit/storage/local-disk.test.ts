import { existsSync, mkdirSync, mkdtempSync, readFileSync, rmSync, statSync, utimesSync, writeFileSync } from "node:fs";
import { tmpdir } from "node:os";
import path from "node:path";
import { afterAll, describe, expect, it } from "vitest";
import { LocalDiskStore } from "@/lib/storage/local-disk";

const base = mkdtempSync(path.join(tmpdir(), "rillscale-local-"));
afterAll(() => rmSync(base, { recursive: true, force: true }));

describe("LocalDiskStore", () => {
  it("moveFile() renames a file of the same filesystem into place: same inode, no copy left behind (POSIX rename())", async () => {
    const store = new LocalDiskStore({ root: path.join(base, "m") });
    const staged = path.join(base, "staged.part");
    writeFileSync(staged, "staged bytes");
    const inode = statSync(staged).ino;
    const info = await store.moveFile("datasets/ab/cd/staged", staged);
    const target = path.join(base, "m", "datasets", "ab", "cd", "staged");
    expect(existsSync(staged)).toBe(false);
    expect(statSync(target).ino).toBe(inode);
    expect(readFileSync(target, "utf8")).toBe("staged bytes");
    expect(info.size).toBe(12);
  });

  it("keeps each key as a file of the same path under its root, and prunes folders a delete empties (derived)", async () => {
    const store = new LocalDiskStore({ root: path.join(base, "a") });
    await store.put("datasets/ab/cd/x", Buffer.from("x"));
    expect(readFileSync(path.join(base, "a", "datasets", "ab", "cd", "x"), "utf8")).toBe("x");
    await store.delete("datasets/ab/cd/x");
    expect(existsSync(path.join(base, "a", "datasets"))).toBe(false);
    expect(existsSync(path.join(base, "a"))).toBe(true);
  });

  it("removeStaleTempFiles() sweeps temp files older than the age and nothing else (derived)", async () => {
    const root = path.join(base, "b");
    const store = new LocalDiskStore({ root });
    await store.put("jobs/j1/summary.json", Buffer.from("{}"));
    const dir = path.join(root, "jobs", "j1");
    const stale = path.join(dir, ".summary.json.0b7c0e2e-5d3e-4f5a-9a55-1f2b3c4d5e6f.tmp");
    const fresh = path.join(dir, ".summary.json.1b7c0e2e-5d3e-4f5a-9a55-1f2b3c4d5e6f.tmp");
    writeFileSync(stale, "half");
    writeFileSync(fresh, "writing");
    const twoHoursAgo = (Date.now() - 2 * 3600_000) / 1000;
    utimesSync(stale, twoHoursAgo, twoHoursAgo);
    mkdirSync(path.join(root, "other"), { recursive: true });
    expect(await store.removeStaleTempFiles(3600_000)).toBe(1);
    expect(existsSync(stale)).toBe(false);
    expect(existsSync(fresh)).toBe(true);
    expect(await store.exists("jobs/j1/summary.json")).toBe(true);
  });
});
