// Limits and the audit trail of the dataset/job routes: request limits per key answered 429 with Retry-After and
// RateLimit headers, and result downloads written to the audit log.
import { beforeAll, describe, expect, it } from "vitest";
import { ADMIN, api, createKey, signIn } from "@/tests/integration/client";
import { binaryTreeGeoJson, countRows, finished, submitOk, uploadOk, waitForJob } from "@/tests/integration/data-helpers";

let admin = "";

beforeAll(async () => {
  admin = await signIn(ADMIN);
});

describe("request limits (draft-ietf-httpapi-ratelimit-headers; RFC 6585 §4)", () => {
  it("a key over its per-minute quota gets 429 with Retry-After and RateLimit headers; another key is unaffected", async () => {
    const { secret } = await createKey(admin, ["jobs:read"], "rate limited");
    const first = await api("/api/v1/jobs?limit=1", { key: secret });
    const policy = first.headers.get("ratelimit-policy")!;
    const quota = Number(/"per-key";q=(\d+);w=60/.exec(policy)![1]);
    expect(first.headers.get("ratelimit")).toMatch(new RegExp(`^"per-(key|org)";r=\\d+;t=\\d+$`));
    // fixed one-minute windows: a window may end mid-test, so send until refused, at most two windows' worth
    let last: Response = first;
    for (let sent = 1; last.status !== 429 && sent <= 2 * quota + 1; sent += 20) {
      const batch = await Promise.all(Array.from({ length: 20 }, () => api("/api/v1/jobs?limit=1", { key: secret })));
      last = batch.find((r) => r.status === 429) ?? batch[batch.length - 1];
    }
    expect(last.status).toBe(429);
    const retry = Number(last.headers.get("retry-after"));
    expect(retry).toBeGreaterThan(0);
    expect(retry).toBeLessThanOrEqual(60);
    expect(last.headers.get("ratelimit")).toBe(`"per-key";r=0;t=${retry}`);
    expect(last.headers.get("content-type")).toBe("application/problem+json");
    const other = (await createKey(admin, ["jobs:read"], "not limited")).secret;
    expect((await api("/api/v1/jobs?limit=1", { key: other })).status).toBe(200);
  });
});

describe("audit of results", () => {
  it("job submission, the result read and every artifact download are in the audit log (issue 6)", async () => {
    const key = (await createKey(admin, ["datasets:write", "jobs:write", "jobs:read", "results:read"], "audited")).secret;
    const d = await uploadOk(key, binaryTreeGeoJson(), "application/geo+json");
    const job = await submitOk(key, { dataset: d.id, kind: "network", params: { snapToleranceM: 2 } });
    expect((await waitForJob(key, job.id, finished)).status).toBe("succeeded");
    expect((await api(`/api/v1/jobs/${job.id}/result`, { key })).status).toBe(200);
    expect((await api(`/api/v1/jobs/${job.id}/artifacts/orders.csv`, { key })).status).toBe(200);
    const count = (action: string) => countRows("SELECT count(*) AS n FROM audit_events WHERE action = $1 AND target = $2", [action, `job:${job.id}`]);
    expect(await count("job.create")).toBe(1);
    expect(await count("result.read")).toBe(1);
    expect(await count("artifact.download")).toBe(1);
    expect(await count("job.succeeded")).toBe(1);
  });
});
