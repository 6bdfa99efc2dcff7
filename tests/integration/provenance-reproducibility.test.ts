// Reproducibility (issue 7, part 2): the same dataset bytes, kind, parameters and software version computed
// twice — by two organisations, so the result cache cannot answer — give byte-identical result JSON and
// artifacts; timings and ids are kept out of both.
import { beforeAll, describe, expect, it } from "vitest";
import { OTHER_ADMIN, api, createKey, signIn, stack } from "@/tests/integration/client";
import { sha256 } from "@/tests/integration/data-helpers";
import { finishedJob } from "@/tests/integration/provenance-fixture";

interface Run { key: string; jobId: string; cachedFrom: string | null }
let a: Run, b: Run;

beforeAll(async () => {
  const otherKey = (await createKey(await signIn(OTHER_ADMIN), ["datasets:write", "jobs:write", "jobs:read", "results:read"], "reproducibility")).secret;
  const [ra, rb] = [await finishedJob(stack().demoKeySecret, 4), await finishedJob(otherKey, 4)];
  a = { key: stack().demoKeySecret, jobId: ra.job.id, cachedFrom: ra.job.cachedFrom };
  b = { key: otherKey, jobId: rb.job.id, cachedFrom: rb.job.cachedFrom };
});

const resultJson = async (r: Run) => {
  const body = (await (await api(`/api/v1/jobs/${r.jobId}/result`, { key: r.key })).json()) as Record<string, unknown>;
  const { job: _id, timingsS: _t, ...rest } = body;
  return JSON.stringify(rest);
};

describe("re-running a job", () => {
  it("is a fresh computation in each organisation (no cache reuse across organisations, derived)", () => {
    expect(a.jobId).not.toBe(b.jobId);
    expect(b.cachedFrom).toBeNull();
  });

  it("gives byte-identical result JSON apart from the job id and timings (derived)", async () => {
    expect(await resultJson(b)).toBe(await resultJson(a));
  });

  it("gives byte-identical artifacts: same names, and the bytes downloaded hash the same (derived)", async () => {
    const list = async (r: Run) => ((await (await api(`/api/v1/jobs/${r.jobId}/artifacts`, { key: r.key })).json()) as { items: { name: string; sha256: string }[] }).items;
    const [la, lb] = [await list(a), await list(b)];
    expect(lb.map((x) => [x.name, x.sha256])).toEqual(la.map((x) => [x.name, x.sha256]));
    expect(la.length).toBeGreaterThan(2);
    for (const art of la) {
      const [ba, bb] = await Promise.all([a, b].map(async (r) => new Uint8Array(await (await api(`/api/v1/jobs/${r.jobId}/artifacts/${art.name}`, { key: r.key })).arrayBuffer())));
      expect(sha256(bb), art.name).toBe(sha256(ba));
      expect(sha256(ba), art.name).toBe(art.sha256);
    }
  });
});
