// Helpers of the dataset, job and result suites: uploads, job polling, generated inputs (a binary-tree stream
// network as GeoJSON, an fBm DEM as GeoTIFF) and the RSS of the server's process tree from /proc.
import { spawn } from "node:child_process";
import { createHash } from "node:crypto";
import { appendFileSync, openSync, readFileSync, readdirSync } from "node:fs";
import { mkdir } from "node:fs/promises";
import path from "node:path";
import { binaryTree } from "@/lib/fractal/synth/binary-tree";
import { fbmSurface } from "@/lib/fractal/synth/fbm-surface";
import { crsFromEpsg } from "@/lib/raster/crs";
import { writeGeoTiff } from "@/lib/raster/write-geotiff";
import { LocalDiskStore } from "@/lib/storage";
import { api, stack } from "@/tests/integration/client";

export const FIXTURES = path.resolve(import.meta.dirname, "../fixtures/cache");
export const fixture = (rel: string) => {
  const p = path.join(FIXTURES, rel);
  try {
    return { path: p, bytes: readFileSync(p) };
  } catch {
    throw new Error(`fixture ${p} is missing: run \`bash tests/fixtures/fetch.sh\``);
  }
};
export const GENERATED = path.resolve(import.meta.dirname, "../../.data/test-generated");

/** The object store and staging directory of this test run (tests/setup/stack.ts). */
export const testStore = () => new LocalDiskStore({ root: stack().env.RILLSCALE_STORAGE_ROOT });
export const stagingDir = () => stack().env.RILLSCALE_UPLOAD_TMP;

export const sha256 = (b: Uint8Array) => createHash("sha256").update(b).digest("hex");

export interface Uploaded {
  id: string;
  sha256: string;
  format: string;
  metadata: Record<string, unknown>;
}

export async function upload(key: string, bytes: Uint8Array, contentType: string, query = ""): Promise<Response> {
  return fetch(`${stack().url}/api/v1/datasets${query}`, {
    method: "POST", headers: { authorization: `Bearer ${key}`, "content-type": contentType }, body: bytes as Uint8Array<ArrayBuffer>,
  });
}

export async function uploadOk(key: string, bytes: Uint8Array, contentType: string, query = ""): Promise<Uploaded> {
  const res = await upload(key, bytes, contentType, query);
  if (res.status !== 201 && res.status !== 200) throw new Error(`upload answered ${res.status}: ${await res.text()}`);
  return (await res.json()) as Uploaded;
}

export interface JobBody {
  id: string;
  status: string;
  stage: string | null;
  progress: number;
  attempts: number;
  cachedFrom: string | null;
  error: Record<string, unknown> | null;
  params: Record<string, unknown>;
}

export async function submit(key: string, body: unknown, headers: Record<string, string> = {}): Promise<Response> {
  return api("/api/v1/jobs", { method: "POST", key, body, headers });
}

export async function submitOk(key: string, body: unknown): Promise<JobBody> {
  const res = await submit(key, body);
  if (res.status !== 202) throw new Error(`job submission answered ${res.status}: ${await res.text()}`);
  return (await res.json()) as JobBody;
}

export async function getJob(key: string, id: string): Promise<JobBody> {
  return (await (await api(`/api/v1/jobs/${id}`, { key })).json()) as JobBody;
}

/** Reads the job every 100 ms until `done(job)`; fails with the last state after timeoutMs. */
export async function pollJob<J>(read: () => Promise<J>, id: string, done: (j: J) => boolean, timeoutMs = 120_000): Promise<J> {
  const deadline = Date.now() + timeoutMs;
  for (;;) {
    const j = await read();
    if (done(j)) return j;
    if (Date.now() > deadline) throw new Error(`job ${id} did not reach the expected state: ${JSON.stringify(j)}`);
    await new Promise((r) => setTimeout(r, 100));
  }
}

/** Polls the shared stack until `done(job)`. */
export const waitForJob = (key: string, id: string, done: (j: JobBody) => boolean, timeoutMs = 120_000): Promise<JobBody> =>
  pollJob(() => getJob(key, id), id, done, timeoutMs);

export const finished = (j: JobBody) => ["succeeded", "failed", "cancelled"].includes(j.status);

/** A complete binary tree of order 5 (Horton R_B = 2 by construction) in lon/lat near (0°, 0°), as GeoJSON. */
export function binaryTreeGeoJson(): Uint8Array {
  const net = binaryTree({ order: 5, outletLengthM: 4000 });
  const deg = 180 / Math.PI / 6378137; // plate carrée on the WGS84 equator: metres → degrees
  const features = net.links.map((l) => ({
    type: "Feature", properties: { link: l.id },
    geometry: { type: "LineString", coordinates: [[l.path[0] * deg, l.path[1] * deg], [l.path[2] * deg, l.path[3] * deg]] },
  }));
  return new TextEncoder().encode(JSON.stringify({ type: "FeatureCollection", features }));
}

/** An fBm DEM of side `size` (a power of two) in UTM 33N with 30 m cells, written once per size. */
export async function fbmDem(size: number, seed = 7): Promise<string> {
  const file = path.join(GENERATED, `fbm-${size}-${seed}.tif`);
  await mkdir(GENERATED, { recursive: true });
  const grid = fbmSurface({ hurst: 0.7, seed, size, sigma: 50 });
  for (let i = 0; i < grid.data.length; i++) grid.data[i] += 500;
  await writeGeoTiff(file, grid, {
    crs: crsFromEpsg(32633), transform: { originX: 500_000, originY: 5_000_000, pixelSizeX: 30, pixelSizeY: 30 }, rasterType: "PixelIsArea",
  });
  return file;
}

/** VmRSS of a process and all its descendants (proc(5)), in bytes. */
export function treeRssBytes(pid: number): number {
  const children = new Map<number, number[]>();
  for (const name of readdirSync("/proc")) {
    if (!/^\d+$/.test(name)) continue;
    try {
      const ppid = Number(/^PPid:\s+(\d+)/m.exec(readFileSync(`/proc/${name}/status`, "utf8"))![1]);
      children.set(ppid, [...(children.get(ppid) ?? []), Number(name)]);
    } catch {
      // exited meanwhile
    }
  }
  let total = 0;
  const stackPids = [pid];
  while (stackPids.length) {
    const p = stackPids.pop()!;
    try {
      total += Number(/^VmRSS:\s+(\d+)\s+kB/m.exec(readFileSync(`/proc/${p}/status`, "utf8"))?.[1] ?? 0) * 1024;
    } catch {
      continue;
    }
    stackPids.push(...(children.get(p) ?? []));
  }
  return total;
}

/** Rows left in the test database, as the owner role sees them. */
export async function countRows(sqlText: string, values: unknown[] = []): Promise<number> {
  const pg = await import("pg");
  const client = new pg.default.Client({ connectionString: stack().ownerUrl });
  await client.connect();
  try {
    return Number((await client.query(sqlText, values)).rows[0].n);
  } finally {
    await client.end();
  }
}

/** A worker started by a test (to replace one it killed). Its output goes to a file, not a pipe, and it is
 *  detached, so it outlives the test file's process; the stack stops it at teardown (extraPidsFile). */
export function startReplacementWorker(extraEnv: Record<string, string>): number {
  const root = path.resolve(import.meta.dirname, "../..");
  const out = openSync(path.join(path.dirname(stack().extraPidsFile), "replacement-worker.log"), "a");
  const child = spawn(process.execPath, ["--conditions=react-server", "--import", "tsx", path.join(root, "jobs", "worker.ts")], {
    cwd: root, env: { ...process.env, ...stack().env, ...extraEnv, NODE_ENV: "production" }, stdio: ["ignore", out, out], detached: true,
  });
  child.unref();
  appendFileSync(stack().extraPidsFile, `${child.pid}\n`);
  return child.pid!;
}
