// Per-organisation limits, each on a stack of its own with small settings (tests/setup/stack.ts startExtraStack):
// RILLSCALE_ORG_MAX_RUNNING_JOBS = 1 with jobs of every kind submitted at once (one pg-boss loop per kind, so
// without the limit they would run side by side), and RILLSCALE_RATE_PER_ORG_PER_MINUTE shared by two keys.
import { readFileSync } from "node:fs";
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { ADMIN, OTHER_ADMIN } from "@/tests/integration/client";
import { binaryTreeGeoJson, fbmDem } from "@/tests/integration/data-helpers";
import { extraClient, type JobTimes } from "@/tests/integration/extra-client";
import { startExtraStack, type ExtraStack } from "@/tests/setup/stack";

const SCOPES = ["datasets:write", "jobs:write", "jobs:read", "results:read"];

/** The most intervals [start, end) open at one instant (sweep line; an end at the same instant as a start comes first). */
function maxOverlap(intervals: { start: number; end: number }[]): number {
  const events = intervals.flatMap((i) => [{ t: i.start, d: 1 }, { t: i.end, d: -1 }]).sort((a, b) => a.t - b.t || a.d - b.d);
  let open = 0, most = 0;
  for (const e of events) most = Math.max(most, (open += e.d));
  return most;
}

describe("RILLSCALE_ORG_MAX_RUNNING_JOBS (issue 6: per-org limit on concurrent running jobs)", () => {
  const LIMIT = 1;
  let app: ExtraStack;
  let c: ReturnType<typeof extraClient>;
  let key = "";

  beforeAll(async () => {
    app = await startExtraStack("orgjobs", {
      RILLSCALE_ORG_MAX_RUNNING_JOBS: String(LIMIT),
      // the test polls the job list ten times a second
      RILLSCALE_RATE_PER_KEY_PER_MINUTE: "100000",
      RILLSCALE_RATE_PER_ORG_PER_MINUTE: "100000",
    });
    c = extraClient(app);
    key = await c.createKey(await c.signIn(ADMIN), SCOPES, "org limit");
  });
  afterAll(async () => {
    await app?.stop();
  });

  it(`six jobs of all four kinds for one org: never more than ${LIMIT} running at once, jobs waited, and all succeed`, async () => {
    const dem = await c.upload(key, readFileSync(await fbmDem(1024)), "image/tiff", "fbm-1024.tif");
    const tree = await c.upload(key, binaryTreeGeoJson(), "application/geo+json", "tree.geojson");
    // distinct parameters, so the result cache (issue 6) reuses nothing
    const bodies = [
      { dataset: dem, kind: "drainage", params: { channelThreshold: { method: "area", km2: 0.5 } } },
      { dataset: dem, kind: "surface", params: { estimators: ["variogram", "power-spectrum"] } },
      { dataset: tree, kind: "network", params: { snapToleranceM: 2 } },
      { dataset: tree, kind: "line", params: {} },
      { dataset: dem, kind: "drainage", params: { channelThreshold: { method: "area", km2: 1 } } },
      { dataset: dem, kind: "surface", params: { estimators: ["variogram"] } },
    ];
    const ids = (await Promise.all(bodies.map((b) => c.submit(key, b)))).map((j) => j.id);

    let mostRunning = 0, sawWaiting = false;
    const deadline = Date.now() + 240_000;
    let jobs: JobTimes[] = [];
    for (;;) {
      jobs = await Promise.all(ids.map((id) => c.getJob(key, id)));
      const running = jobs.filter((j) => j.status === "running").length;
      mostRunning = Math.max(mostRunning, running);
      if (running > 0 && jobs.some((j) => j.status === "queued")) sawWaiting = true;
      if (jobs.every((j) => j.status !== "queued" && j.status !== "running") || Date.now() > deadline) break;
      await new Promise((r) => setTimeout(r, 100));
    }
    for (const j of jobs) expect(j.status, `${j.kind}: ${JSON.stringify(j.error)}`).toBe("succeeded"); // derived: the limit delays jobs, never fails them
    expect(mostRunning).toBeGreaterThan(0); // derived
    expect(mostRunning).toBeLessThanOrEqual(LIMIT); // derived: the per-org limit of our own design (issue 6)
    expect(sawWaiting).toBe(true); // derived: six jobs over a limit below six must queue
    // the worker's own timestamps: started (first claim) to finished never overlap beyond the limit (derived)
    const overlap = maxOverlap(jobs.map((j) => ({ start: Date.parse(j.startedAt!), end: Date.parse(j.finishedAt!) })));
    console.log(`org running-jobs limit ${LIMIT}: most seen running ${mostRunning}, most overlapping by timestamps ${overlap}`);
    expect(overlap).toBe(LIMIT); // derived: the limit is reached and never passed
  });

  it("a job waiting behind the limit is cancelled at once: it never starts, and the audit log names the cancel and what the job was (issue 6)", async () => {
    const dem = await c.upload(key, readFileSync(await fbmDem(2048, 11)), "image/tiff", "fbm-2048-b.tif");
    const first = await c.submit(key, { dataset: dem, kind: "drainage", params: { channelThreshold: { method: "area", km2: 0.5 } } });
    await c.waitForJob(key, first.id, (j) => j.status === "running");
    const waiting = await c.submit(key, { dataset: dem, kind: "surface", params: { estimators: ["variogram"] } });
    expect((await c.getJob(key, waiting.id)).status).toBe("queued"); // derived: the one slot is taken
    const res = await c.call(`/api/v1/jobs/${waiting.id}/cancel`, { method: "POST", key });
    expect(res.status).toBe(200); // done at once: 200 with the job, where a running one answers 202 (RFC 9110 §15.3.3)
    expect(((await res.json()) as JobTimes).status).toBe("cancelled"); // derived: a queued job has no worker to wait for
    const done = await c.waitForJob(key, first.id, (j) => j.status === "succeeded" || j.status === "failed", 180_000);
    expect(done.status).toBe("succeeded");
    const after = await c.getJob(key, waiting.id);
    expect(after).toMatchObject({ status: "cancelled", startedAt: null }); // derived: the slot freed, it still never ran
    const audit = await c.call("/api/v1/audit?action=job.cancel", { cookie: await c.signIn(ADMIN) });
    const events = ((await audit.json()) as { items: { target: string; details: { was?: string } }[] }).items;
    expect(events.filter((e) => e.target === `job:${waiting.id}`).map((e) => e.details.was)).toEqual(["queued"]);
  });
});

describe("RILLSCALE_RATE_PER_ORG_PER_MINUTE (issue 6; draft-ietf-httpapi-ratelimit-headers; RFC 6585 §4)", () => {
  const ORG_QUOTA = 20;
  let app: ExtraStack;
  let c: ReturnType<typeof extraClient>;
  let keyA = "", keyB = "", otherOrgKey = "";

  beforeAll(async () => {
    app = await startExtraStack("orgrate", { RILLSCALE_RATE_PER_ORG_PER_MINUTE: String(ORG_QUOTA), RILLSCALE_RATE_PER_KEY_PER_MINUTE: "1000" });
    c = extraClient(app);
    const admin = await c.signIn(ADMIN);
    keyA = await c.createKey(admin, ["jobs:read"], "org rate A");
    keyB = await c.createKey(admin, ["jobs:read"], "org rate B");
    otherOrgKey = await c.createKey(await c.signIn(OTHER_ADMIN), ["jobs:read"], "org rate other");
  });
  afterAll(async () => {
    await app?.stop();
  });

  it("two keys of one org share the org quota: 429 per-org with Retry-After once together they pass it, far below each key's own quota; another org is unaffected", async () => {
    const first = await c.call("/api/v1/jobs?limit=1", { key: keyA });
    expect(first.status).toBe(200); // derived: the first request is within every quota
    expect(first.headers.get("ratelimit-policy")).toBe(`"per-key";q=1000;w=60, "per-org";q=${ORG_QUOTA};w=60`); // draft-ietf-httpapi-ratelimit-headers (RateLimit-Policy)
    // alternate the keys; fixed one-minute windows may end mid-test, so send at most two windows' worth
    const sent = { A: 1, B: 0 };
    let refused: Response | null = null;
    for (let i = 0; refused === null && i < 2 * ORG_QUOTA + 2; i++) {
      const which = i % 2 === 0 ? "B" : "A";
      sent[which]++;
      const res = await c.call("/api/v1/jobs?limit=1", { key: which === "A" ? keyA : keyB });
      if (res.status === 429) refused = res;
      else expect(res.status).toBe(200); // derived: below the org quota every request passes
    }
    expect(refused, "no 429 within two windows' worth of requests").not.toBeNull(); // RFC 6585 §4 (429); derived bound
    // neither key came near its own quota (1000): the org's count refused it
    expect(Math.max(sent.A, sent.B)).toBeLessThanOrEqual(ORG_QUOTA + 2); // derived
    const retry = Number(refused!.headers.get("retry-after"));
    expect(retry).toBeGreaterThan(0); // RFC 6585 §4: a 429 may say in Retry-After how long to wait (delay-seconds, RFC 9110 §10.2.3)
    expect(retry).toBeLessThanOrEqual(60); // derived: never past the end of a one-minute window
    expect(refused!.headers.get("ratelimit")).toBe(`"per-org";r=0;t=${retry}`); // draft-ietf-httpapi-ratelimit-headers (RateLimit: r remaining, t reset)
    expect(refused!.headers.get("content-type")).toBe("application/problem+json"); // RFC 9457 §3
    expect(((await refused!.json()) as { type: string }).type).toBe("https://rillscale.example/problems/too-many-requests"); // RFC 9457 §3 type member
    // the other key of the same org is refused too (same window), a key of another org is not
    const [a, b] = await Promise.all([keyA, keyB].map((k) => c.call("/api/v1/jobs?limit=1", { key: k })));
    expect([a.status, b.status]).toEqual([429, 429]); // RFC 6585 §4; derived: the org window is shared
    expect((await c.call("/api/v1/jobs?limit=1", { key: otherOrgKey })).status).toBe(200); // derived: quotas are per org
  });
});
