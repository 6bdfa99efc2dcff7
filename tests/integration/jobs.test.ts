// Jobs end to end over HTTP against the started server, worker and PostgreSQL: every kind on real or generated
// files with /result compared to the library-level pipeline on the same file, the result cache, parameter
// validation, idempotency, listing, cancel, and a worker killed mid-job.
import { randomUUID } from "node:crypto";
import { readFileSync } from "node:fs";
import { mkdtemp } from "node:fs/promises";
import { tmpdir } from "node:os";
import path from "node:path";
import { beforeAll, describe, expect, it } from "vitest";
import { runDrainage } from "@/lib/pipelines/drainage";
import { runLine } from "@/lib/pipelines/line";
import { runNetwork } from "@/lib/pipelines/network";
import { runSurface } from "@/lib/pipelines/surface";
import { systemClock } from "@/lib/auth/clock";
import { purgeExpiredIdempotencyKeys } from "@/lib/jobs/idempotency";
import { purgeEndedWindows } from "@/lib/jobs/rate-limit";
import { ADMIN, OTHER_ADMIN, api, appDb, createKey, signIn, stack } from "@/tests/integration/client";
import {
  binaryTreeGeoJson, countRows, fbmDem, finished, fixture, sha256, startReplacementWorker, submit, submitOk, testStore, uploadOk, waitForJob, type JobBody,
} from "@/tests/integration/data-helpers";

let key = "";
let keyId = "";
let otherKey = "";
const ids: Record<string, string> = {};
/** JSON as the API stores and sends it: NaN and ±Infinity become null. */
const asJson = (v: unknown) => JSON.parse(JSON.stringify(v)) as unknown;

beforeAll(async () => {
  const admin = await signIn(ADMIN);
  ({ secret: key, id: keyId } = await createKey(admin, ["datasets:write", "jobs:write", "jobs:read", "results:read"], "jobs suite"));
  otherKey = (await createKey(await signIn(OTHER_ADMIN), ["admin"], "jobs suite other org")).secret;
  ids.jacksboro = (await uploadOk(key, fixture("debian/jacksboro.tif").bytes, "image/tiff", "?filename=jacksboro.tif")).id;
  ids.elev = (await uploadOk(key, fixture("debian/elev.tif").bytes, "image/tiff", "?filename=elev.tif")).id;
  ids.tree = (await uploadOk(key, binaryTreeGeoJson(), "application/geo+json", "?filename=tree.geojson")).id;
});

async function runToSuccess(body: unknown): Promise<JobBody> {
  const job = await submitOk(key, body);
  const done = await waitForJob(key, job.id, finished);
  expect(done.error, JSON.stringify(done.error)).toBeNull();
  expect(done.status).toBe("succeeded");
  return done;
}

async function resultOf(id: string) {
  const res = await api(`/api/v1/jobs/${id}/result`, { key });
  expect(res.status).toBe(200);
  return (await res.json()) as { summary: unknown; timingsS: Record<string, number>; cachedFrom: string | null; software: { version: string } };
}

describe("every job kind over the API gives the library pipeline's summary on the same file", () => {
  const outDir = () => mkdtemp(path.join(tmpdir(), "rillscale-lib-"));

  it("drainage of the Jacksboro DEM: /result equals runDrainage() apart from timings and ids (derived)", async () => {
    const params = { channelThreshold: { method: "area", km2: 2 } } as const;
    const job = await runToSuccess({ dataset: ids.jacksboro, kind: "drainage", params });
    const lib = await runDrainage({ demPath: fixture("debian/jacksboro.tif").path, outDir: await outDir() }, params);
    const r = await resultOf(job.id);
    expect(r.summary).toEqual(asJson(lib.summary));
    expect(Object.keys(r.timingsS)).toContain("fill");
    expect(job.progress).toBe(1);
    const arts = (await (await api(`/api/v1/jobs/${job.id}/artifacts`, { key })).json()) as { items: { name: string; mediaType: string; sizeBytes: number; sha256: string }[] };
    expect(arts.items.map((a) => a.name).sort()).toEqual(["basins.tif", "flow-accumulation.tif", "horton-orders.csv", "strahler-order.tif", "streams.geojson"].sort());
    const csv = await (await api(`/api/v1/jobs/${job.id}/artifacts/horton-orders.csv`, { key })).text();
    expect(csv.split("\r\n")[0]).toBe("order,stream_count,mean_length_m,mean_area_km2,mean_slope_m_per_m");
    expect(csv.trim().split("\r\n")).toHaveLength(1 + lib.summary.horton.table.length);
    const streams = lib.artifacts.find((a) => a.name === "streams.geojson")!;
    const dl = await api(`/api/v1/jobs/${job.id}/artifacts/streams.geojson`, { key, headers: { "accept-encoding": "gzip" } });
    const served = new Uint8Array(await dl.arrayBuffer());
    expect(dl.headers.get("content-type")).toBe("application/geo+json");
    expect(arts.items.find((a) => a.name === "streams.geojson")!.sizeBytes).toBe(served.length);
    expect(dl.headers.get("content-length")).toBe(String(served.length)); // RFC 9110 §8.6
    expect(dl.headers.get("content-encoding")).toBeNull(); // no-transform: the bytes the ETag names, even to gzip clients
    expect(sha256(served)).toBe(sha256(streams.bytes!));
    expect(dl.headers.get("etag")).toBe(`"${sha256(served)}"`);
    const part = await api(`/api/v1/jobs/${job.id}/artifacts/streams.geojson`, { key, headers: { range: "bytes=10-19" } });
    expect(part.status).toBe(206);
    expect(part.headers.get("content-range")).toBe(`bytes 10-19/${served.length}`);
    expect(part.headers.get("content-length")).toBe("10");
    expect(new Uint8Array(await part.arrayBuffer())).toEqual(served.subarray(10, 20));
    const cached = await api(`/api/v1/jobs/${job.id}/artifacts/streams.geojson`, { key, headers: { "if-none-match": dl.headers.get("etag")! } });
    expect(cached.status).toBe(304);
    const past = await api(`/api/v1/jobs/${job.id}/artifacts/streams.geojson`, { key, headers: { range: `bytes=${served.length}-` } });
    expect(past.status).toBe(416);
    expect(past.headers.get("content-range")).toBe(`bytes */${served.length}`);
    ids.drainageJob = job.id;
  });

  it("surface of the Luxembourg DEM: /result equals runSurface() (derived)", async () => {
    const params = { estimators: ["variogram", "cube-counting", "power-spectrum", "triangular-prism"], localWindowCells: 16, localStepCells: 8 };
    const job = await runToSuccess({ dataset: ids.elev, kind: "surface", params });
    const lib = await runSurface({ demPath: fixture("debian/elev.tif").path, outDir: await outDir() }, params as never);
    expect((await resultOf(job.id)).summary).toEqual(asJson(lib.summary));
    const csv = await api(`/api/v1/jobs/${job.id}/artifacts/fit-points.csv`, { key });
    expect(csv.headers.get("content-type")).toBe("text/csv; charset=utf-8");
    const rows = (await csv.text()).trim().split("\r\n");
    expect(rows[0]).toBe("fit,scale,measure,used,scale_unit");
    expect(rows.some((r) => r.startsWith("/estimators/variogram/"))).toBe(true);
  });

  it("network of a generated binary tree: /result equals runNetwork() and R_B = 2 (Horton 1945; derived N_ω = 2^(Ω−ω))", async () => {
    const job = await runToSuccess({ dataset: ids.tree, kind: "network", params: {} });
    const lib = await runNetwork({ geojson: JSON.parse(new TextDecoder().decode(binaryTreeGeoJson())) }, {});
    const r = await resultOf(job.id);
    expect(r.summary).toEqual(asJson(lib.summary));
    expect((r.summary as { horton: { bifurcation: { value: number } } }).horton.bifurcation.value).toBeCloseTo(2, 6);
  });

  it("line dimension of the same lines: /result equals runLine() (derived)", async () => {
    const job = await runToSuccess({ dataset: ids.tree, kind: "line", params: {} });
    const lib = await runLine({ geojson: JSON.parse(new TextDecoder().decode(binaryTreeGeoJson())) }, {});
    expect((await resultOf(job.id)).summary).toEqual(asJson(lib.summary));
  });
});

describe("submission", () => {
  it("the same dataset, kind and parameters reuse the earlier result at once, recorded as reused (issue 6 result cache)", async () => {
    const res = await submit(key, { dataset: ids.jacksboro, kind: "drainage", params: { channelThreshold: { method: "area", km2: 2 } } });
    expect(res.status).toBe(202);
    const job = (await res.json()) as JobBody;
    expect(job.status).toBe("succeeded");
    expect(job.cachedFrom).toBe(ids.drainageJob);
    expect(res.headers.get("location")).toBe(`/api/v1/jobs/${job.id}`);
    const [a, b] = await Promise.all([resultOf(job.id), resultOf(ids.drainageJob)]);
    expect(a.summary).toEqual(b.summary);
    expect(a.cachedFrom).toBe(ids.drainageJob);
  });

  it("parameters are checked by the kind's schema: 422 with a JSON Pointer under /params (RFC 9457, RFC 6901)", async () => {
    const res = await submit(key, { dataset: ids.jacksboro, kind: "drainage", params: { channelThreshold: { method: "area", km2: -1 } } });
    expect(res.status).toBe(422);
    const p = (await res.json()) as { errors: { pointer: string }[] };
    expect(p.errors.map((e) => e.pointer)).toContain("/params/channelThreshold/km2");
  });

  it("a kind that cannot read the dataset's format is refused with 422 naming /dataset (derived)", async () => {
    const res = await submit(key, { dataset: ids.tree, kind: "drainage", params: {} });
    expect(res.status).toBe(422);
    expect(((await res.json()) as { errors: { pointer: string }[] }).errors[0].pointer).toBe("/dataset");
  });

  it("another organisation's dataset and job ids answer 404, as unknown ones do (STANDARDS.md)", async () => {
    const res = await submit(otherKey, { dataset: ids.jacksboro, kind: "drainage", params: {} });
    expect(res.status).toBe(422);
    expect((await api(`/api/v1/jobs/${ids.drainageJob}`, { key: otherKey })).status).toBe(404);
    expect((await api(`/api/v1/jobs/${ids.drainageJob}/result`, { key: otherKey })).status).toBe(404);
    expect((await api(`/api/v1/jobs/${randomUUID()}`, { key })).status).toBe(404);
    expect((await api(`/api/v1/jobs/not-a-uuid`, { key })).status).toBe(404);
  });

  it("a key without jobs:write may not submit, without results:read may not read results (scopes, RFC 6750 insufficient_scope)", async () => {
    const admin = await signIn(ADMIN);
    const readOnly = (await createKey(admin, ["jobs:read"], "jobs read only")).secret;
    expect((await submit(readOnly, { dataset: ids.jacksboro, kind: "drainage", params: {} })).status).toBe(403);
    expect((await api(`/api/v1/jobs/${ids.drainageJob}`, { key: readOnly })).status).toBe(200);
    expect((await api(`/api/v1/jobs/${ids.drainageJob}/result`, { key: readOnly })).status).toBe(403);
  });
});

describe("Idempotency-Key (draft-ietf-httpapi-idempotency-key-header)", () => {
  const body = () => ({ dataset: ids.elev, kind: "surface", params: { estimators: ["variogram"], lagCount: 5 } });

  it("the same key and body replay the first response; a different body with that key is 422", async () => {
    const k = `idem-${randomUUID()}`;
    const first = await submit(key, body(), { "idempotency-key": `"${k}"` });
    expect(first.status).toBe(202);
    const again = await submit(key, body(), { "idempotency-key": k }); // bare form of the same key
    expect(again.status).toBe(202);
    expect(again.headers.get("idempotent-replayed")).toBe("true");
    expect(((await again.json()) as JobBody).id).toBe(((await first.json()) as JobBody).id);
    const other = await submit(key, { ...body(), params: { estimators: ["variogram"], lagCount: 6 } }, { "idempotency-key": k });
    expect(other.status).toBe(422);
  });

  it("a key whose first request is still in flight answers 409; concurrent requests make one job (draft §2.6)", async () => {
    const k = `idem-${randomUUID()}`;
    const answers = await Promise.all(Array.from({ length: 6 }, () => submit(key, body(), { "idempotency-key": k })));
    const statuses = answers.map((r) => r.status);
    expect(statuses.every((s) => s === 202 || s === 409), statuses.join(",")).toBe(true);
    const jobIds = new Set(await Promise.all(answers.filter((r) => r.status === 202).map(async (r) => ((await r.json()) as JobBody).id)));
    expect(jobIds.size).toBe(1);
    // an in-flight record (no stored response yet) written as the first request would leave it
    const k2 = `idem-${randomUUID()}`;
    const me = (await (await api("/api/v1/me", { key })).json()) as { org: { id: string } };
    await countRows(`WITH i AS (INSERT INTO idempotency_keys (org_id, principal, key, fingerprint, expires_at)
      VALUES ($1, $2, $3, 'x', now() + interval '1 hour') RETURNING 1) SELECT count(*) AS n FROM i`, [me.org.id, `key:${keyId}`, k2]);
    expect((await submit(key, body(), { "idempotency-key": k2 })).status).toBe(409);
  });
});

describe("retention of request records", () => {
  it("records past their retention and counters of ended windows are purged; live ones stay (derived)", async () => {
    const { pool, db } = appDb();
    try {
      const me = (await (await api("/api/v1/me", { key })).json()) as { org: { id: string } };
      const expired = `old-${randomUUID()}`, live = `live-${randomUUID()}`;
      await countRows(`WITH i AS (INSERT INTO idempotency_keys (org_id, principal, key, fingerprint, expires_at)
        VALUES ($1, 'key:x', $2, 'f', now() - interval '1 minute'), ($1, 'key:x', $3, 'f', now() + interval '1 hour') RETURNING 1)
        SELECT count(*) AS n FROM i`, [me.org.id, expired, live]);
      await countRows(`WITH i AS (INSERT INTO rate_limit_counters (bucket, window_started_at, count) VALUES ($1, now() - interval '1 hour', 5) RETURNING 1)
        SELECT count(*) AS n FROM i`, [`key:${expired}`]);
      expect(await purgeExpiredIdempotencyKeys(db, systemClock)).toBeGreaterThanOrEqual(1);
      expect(await purgeEndedWindows(db, systemClock)).toBeGreaterThanOrEqual(1);
      expect(await countRows("SELECT count(*) AS n FROM idempotency_keys WHERE key = ANY($1)", [[expired, live]])).toBe(1);
      expect(await countRows("SELECT count(*) AS n FROM rate_limit_counters WHERE bucket = $1", [`key:${expired}`])).toBe(0);
    } finally {
      await pool.end();
    }
  });
});

describe("GET /api/v1/jobs", () => {
  it("filters by status, kind, dataset and creation time, and pages with an opaque cursor (derived)", async () => {
    const all = (await (await api(`/api/v1/jobs?kind=drainage&status=succeeded&dataset=${ids.jacksboro}`, { key })).json()) as { items: JobBody[] };
    expect(all.items.length).toBeGreaterThanOrEqual(2);
    expect(all.items.every((j) => j.status === "succeeded")).toBe(true);
    const p1 = (await (await api(`/api/v1/jobs?kind=drainage&limit=1`, { key })).json()) as { items: JobBody[]; nextCursor: string };
    const p2 = (await (await api(`/api/v1/jobs?kind=drainage&limit=1&cursor=${p1.nextCursor}`, { key })).json()) as { items: JobBody[] };
    expect(p1.items[0].id).not.toBe(p2.items[0].id);
    const future = new Date(Date.now() + 3600_000).toISOString();
    expect(((await (await api(`/api/v1/jobs?createdFrom=${future}`, { key })).json()) as { items: unknown[] }).items).toEqual([]);
    expect((await api(`/api/v1/jobs?status=nonsense`, { key })).status).toBe(422);
  });
});

describe("long jobs", () => {
  let bigDataset = "";
  beforeAll(async () => {
    const file = await fbmDem(2048);
    bigDataset = (await uploadOk(key, readFileSync(file), "image/tiff", "?filename=fbm-2048.tif")).id;
  });

  it("a running job is cancelled at the worker's next check, ends cancelled, and leaves no artifacts (issue 6)", async () => {
    const job = await submitOk(key, { dataset: bigDataset, kind: "drainage", params: { channelThreshold: { method: "area", km2: 0.5 } } });
    await waitForJob(key, job.id, (j) => j.status === "running");
    expect((await api(`/api/v1/datasets/${bigDataset}`, { method: "DELETE", key })).status).toBe(409);
    const res = await api(`/api/v1/jobs/${job.id}/cancel`, { method: "POST", key });
    expect(res.status).toBe(202);
    const t0 = Date.now();
    const done = await waitForJob(key, job.id, finished, 20_000);
    expect(done.status).toBe("cancelled");
    expect(Date.now() - t0).toBeLessThan(5_000);
    expect((await api(`/api/v1/jobs/${job.id}/artifacts`, { key })).status).toBe(409);
    const left: string[] = [];
    for await (const k of testStore().list(`jobs/${job.id}/`)) left.push(k);
    expect(left).toEqual([]);
  });

  it("a worker killed with SIGKILL mid-job is replaced; the job completes exactly once (issue 6)", async () => {
    const job = await submitOk(key, { dataset: bigDataset, kind: "drainage", params: { channelThreshold: { method: "area", km2: 0.25 } } });
    const running = await waitForJob(key, job.id, (j) => j.status === "running" && j.stage !== "starting");
    expect(running.attempts).toBe(1);
    process.kill(stack().workerPid, "SIGKILL");
    startReplacementWorker({ RILLSCALE_JOB_STALE_SECONDS: "2" });
    const done = await waitForJob(key, job.id, finished, 180_000);
    expect(done.status, JSON.stringify(done.error)).toBe("succeeded");
    expect(done.attempts).toBe(2);
    expect(await countRows("SELECT count(*) AS n FROM job_results WHERE job_id = $1", [job.id])).toBe(1);
    expect(await countRows("SELECT count(*) AS n FROM audit_events WHERE action = 'job.succeeded' AND target = $1", [`job:${job.id}`])).toBe(1);
    const arts = (await (await api(`/api/v1/jobs/${job.id}/artifacts`, { key })).json()) as { items: { name: string; sha256: string }[] };
    const stored: string[] = [];
    for await (const k of testStore().list(`jobs/${job.id}/`)) stored.push(k.split("/").at(-1)!);
    expect(stored.sort()).toEqual(arts.items.map((a) => a.name).sort());
  });
});
