// A drainage job interrupted while the worker stores its artifacts (jobs/handlers/run-job.ts writes them to the
// object store after the analysis thread ends): cancelled there, it leaves no object and no result row; its worker
// SIGKILLed there, the retry ends with exactly one set of artifacts. On a stack of this suite's own
// (tests/setup/stack.ts startExtraStack), so killing its worker leaves the shared stack alone.
import { readFileSync } from "node:fs";
import type { ChildProcess } from "node:child_process";
import pg from "pg";
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { ADMIN } from "@/tests/integration/client";
import { fbmDem, sha256 } from "@/tests/integration/data-helpers";
import { extraClient } from "@/tests/integration/extra-client";
import { spawnWorker, stopChild } from "@/scripts/stack";
import { startExtraStack, type ExtraStack } from "@/tests/setup/stack";

let app: ExtraStack;
let c: ReturnType<typeof extraClient>;
let pool: pg.Pool;
let replacement: ChildProcess | null = null;
let key = "";
let dem = "";

const finished = (j: { status: string }) => ["succeeded", "failed", "cancelled"].includes(j.status);
const rows = async (sqlText: string, jobId: string) => Number((await pool.query(sqlText, [jobId])).rows[0].n);

async function storedKeys(jobId: string): Promise<string[]> {
  const keys: string[] = [];
  for await (const k of c.store().list(`jobs/${jobId}/`)) keys.push(k);
  return keys.sort();
}

/** Polls the store every 10 ms until the job's first artifact object exists; fails if the job ends first. */
async function untilFirstArtifact(jobId: string, timeoutMs = 180_000): Promise<string[]> {
  const deadline = Date.now() + timeoutMs;
  let polls = 0;
  for (;;) {
    const keys = await storedKeys(jobId);
    if (keys.length > 0) return keys;
    // every 20th poll (200 ms) also reads the job, so a job that ends without artifacts fails fast
    if (++polls % 20 === 0 && finished(await c.getJob(key, jobId))) throw new Error(`job ${jobId} ended before any artifact was stored`);
    if (Date.now() > deadline) throw new Error(`no artifact of job ${jobId} within ${timeoutMs} ms`);
    await new Promise((r) => setTimeout(r, 10));
  }
}

beforeAll(async () => {
  app = await startExtraStack("artifacts", {});
  c = extraClient(app);
  pool = new pg.Pool({ connectionString: app.env.DATABASE_URL, max: 1 });
  key = await c.createKey(await c.signIn(ADMIN), ["datasets:write", "jobs:write", "jobs:read", "results:read"], "interrupted artifacts");
  // 2048² cells: accumulation, order and basin GeoTIFFs of several MiB each, so storing them takes a while
  dem = await c.upload(key, readFileSync(await fbmDem(2048)), "image/tiff", "fbm-2048.tif");
});

afterAll(async () => {
  if (replacement) await stopChild(replacement);
  await pool?.end();
  await app?.stop();
});

describe("interrupted while the artifacts are stored (issue 6)", () => {
  it("cancelled after its first artifact object exists: ends cancelled, the store holds none of its objects, no result or feature rows remain", async () => {
    // the remaining artifacts can be stored and the job finish before the cancel arrives; then the cancel answers
    // 409 and the test tries again with another job (new parameters, so no cached result)
    let job: Awaited<ReturnType<typeof c.submit>> | null = null;
    let atCancel: string[] = [];
    for (let attempt = 0; attempt < 3 && job === null; attempt++) {
      const candidate = await c.submit(key, { dataset: dem, kind: "drainage", params: { channelThreshold: { method: "area", km2: 0.5 + attempt / 10 } } });
      atCancel = await untilFirstArtifact(candidate.id);
      const res = await c.call(`/api/v1/jobs/${candidate.id}/cancel`, { method: "POST", key });
      if (res.status === 409) continue; // RFC 9110 §15.5.10: it had already succeeded
      expect(res.status).toBe(202); // RFC 9110 §15.3.3: the cancel is accepted and carried out asynchronously
      job = candidate;
    }
    if (job === null) throw new Error("every job finished before its cancel arrived (3 tries)");
    const done = await c.waitForJob(key, job.id, finished, 60_000);
    console.log(`cancelled with ${atCancel.length} artifact object(s) already stored: ${atCancel.map((k) => k.split("/").at(-1)).join(", ")}`);
    // a partial set existed when the cancel came, so "gone" below is about objects that were really written
    expect(atCancel.length).toBeGreaterThan(0); // derived: the precondition of this test
    expect(done.status).toBe("cancelled"); // derived
    expect(await storedKeys(job.id)).toEqual([]); // derived: no objects left after cancel
    expect(await rows("SELECT count(*) AS n FROM job_results WHERE job_id = $1", job.id)).toBe(0); // derived: no result row after cancel
    expect(await rows("SELECT count(*) AS n FROM network_features WHERE job_id = $1", job.id)).toBe(0); // derived: no feature rows after cancel
    expect((await c.call(`/api/v1/jobs/${job.id}/artifacts`, { key })).status).toBe(409); // derived; 409 Conflict with the job's state (RFC 9110 §15.5.10)
  });

  it("its worker SIGKILLed after its first artifact object exists: the retry succeeds with exactly one set of artifacts", async () => {
    const job = await c.submit(key, { dataset: dem, kind: "drainage", params: { channelThreshold: { method: "area", km2: 0.25 } } });
    const atKill = await untilFirstArtifact(job.id);
    process.kill(app.workerPid, "SIGKILL");
    expect(atKill.length).toBeGreaterThan(0); // derived: the precondition of this test
    // a short stale time so the replacement takes the dead worker's job over within seconds
    replacement = spawnWorker({ ...app.env, RILLSCALE_JOB_STALE_SECONDS: "5" }, () => undefined);
    const done = await c.waitForJob(key, job.id, finished, 240_000);
    expect(done.status, JSON.stringify(done.error)).toBe("succeeded"); // derived: a killed attempt is retried
    expect(done.attempts).toBe(2); // derived: the killed attempt and its retry
    expect(await rows("SELECT count(*) AS n FROM job_results WHERE job_id = $1", job.id)).toBe(1); // derived: exactly one result
    expect(await rows("SELECT count(*) AS n FROM audit_events WHERE action = 'job.succeeded' AND target = 'job:' || $1", job.id)).toBe(1); // derived: success audited once
    const listed = (await (await c.call(`/api/v1/jobs/${job.id}/artifacts`, { key })).json()) as { items: { name: string; sha256: string }[] };
    const stored = await storedKeys(job.id);
    // one object per listed artifact, no leftovers of the killed attempt, and each object is the one listed
    expect(stored.map((k) => k.split("/").at(-1)).sort()).toEqual(listed.items.map((a) => a.name).sort()); // derived
    for (const k of atKill) expect(stored).toContain(k); // the killed attempt's objects were overwritten in place (derived)
    for (const a of listed.items) {
      const res = await c.call(`/api/v1/jobs/${job.id}/artifacts/${a.name}`, { key });
      expect(sha256(new Uint8Array(await res.arrayBuffer())), a.name).toBe(a.sha256); // derived: each object is the one listed
    }
  });
});
