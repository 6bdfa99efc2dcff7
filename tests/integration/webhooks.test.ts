// Webhooks end to end: endpoints registered over the API, deliveries sent by the worker when a job ends, to
// local receivers that verify them with the standardwebhooks npm package (an independent implementation);
// retries keep the webhook-id, a 410 disables the endpoint, a rotated secret signs beside the old one.
import http from "node:http";
import type { AddressInfo } from "node:net";
import { Webhook } from "standardwebhooks";
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { ADMIN, api, ownerPool, signIn, stack } from "@/tests/integration/client";
import { finishedJob } from "@/tests/integration/provenance-fixture";

interface Received { path: string; headers: Record<string, string>; body: string; answered: number }
const received: Received[] = [];
let flakyCalls = 0;
let server: http.Server;
let base = "";
let admin = "";

const answerFor = (p: string) => (p === "/flaky" ? (++flakyCalls <= 2 ? 500 : 200) : p === "/gone" ? 410 : 200);

beforeAll(async () => {
  server = http.createServer((req, res) => {
    let body = "";
    req.on("data", (c) => (body += c));
    req.on("end", () => {
      const answered = answerFor(req.url!);
      received.push({ path: req.url!, headers: req.headers as Record<string, string>, body, answered });
      res.writeHead(answered).end();
    });
  });
  await new Promise<void>((r) => server.listen(0, "127.0.0.1", r));
  base = `http://127.0.0.1:${(server.address() as AddressInfo).port}`;
  admin = await signIn(ADMIN);
});
afterAll(async () => {
  // later suites end jobs too: leave no endpoint pointing at this closed receiver
  const list = (await (await api("/api/v1/webhooks", { cookie: admin })).json()) as { items: { id: string }[] };
  for (const e of list.items) await api(`/api/v1/webhooks/${e.id}`, { method: "DELETE", cookie: admin });
  await new Promise<void>((r) => server.close(() => r()));
});

async function register(p: string): Promise<{ id: string; secret: string }> {
  const res = await api("/api/v1/webhooks", { method: "POST", cookie: admin, body: { url: base + p, events: ["job.succeeded", "job.failed", "job.cancelled"] } });
  expect(res.status, await res.clone().text()).toBe(201);
  const b = (await res.json()) as { endpoint: { id: string }; secret: string };
  return { id: b.endpoint.id, secret: b.secret };
}

async function until<T>(f: () => T | undefined | Promise<T | undefined>, timeoutMs = 20_000): Promise<T> {
  const deadline = Date.now() + timeoutMs;
  for (;;) {
    const v = await f();
    if (v !== undefined && v !== false) return v as T;
    if (Date.now() > deadline) throw new Error("timed out");
    await new Promise((r) => setTimeout(r, 100));
  }
}

const forJob = (p: string, jobId: string) => received.filter((r) => r.path === p && JSON.parse(r.body).data.id === jobId);

describe("webhooks", () => {
  let ok: { id: string; secret: string }, flaky: { id: string; secret: string }, gone: { id: string; secret: string };
  let jobId = "";

  beforeAll(async () => {
    [ok, flaky, gone] = [await register("/ok"), await register("/flaky"), await register("/gone")];
    jobId = (await finishedJob(stack().demoKeySecret, 5)).job.id; // a cache hit when another suite ran it: ends at once
    await until(() => forJob("/flaky", jobId).length >= 3 || undefined);
  });

  it("a delivery verifies with the standardwebhooks package and carries the thin job.succeeded payload (Standard Webhooks 1.0)", () => {
    const [d] = forJob("/ok", jobId);
    const payload = new Webhook(ok.secret).verify(d.body, d.headers) as { type: string; data: { id: string; status: string } };
    expect(payload.type).toBe("job.succeeded");
    expect(payload.data).toMatchObject({ id: jobId, status: "succeeded" });
    expect(() => new Webhook(flaky.secret).verify(d.body, d.headers)).toThrow();
  });

  it("a receiver answering 500 twice then 200 gets three attempts with the same webhook-id (Standard Webhooks 1.0)", async () => {
    const attempts = forJob("/flaky", jobId);
    expect(attempts.map((a) => a.answered)).toEqual([500, 500, 200]);
    expect(new Set(attempts.map((a) => a.headers["webhook-id"])).size).toBe(1);
    for (const a of attempts) expect(() => new Webhook(flaky.secret).verify(a.body, a.headers)).not.toThrow();
    const log = (await (await api(`/api/v1/webhooks/${flaky.id}/deliveries`, { cookie: admin })).json()) as { items: { id: string; state: string; attempts: number }[] };
    const delivery = log.items.find((d) => d.id === attempts[0].headers["webhook-id"])!;
    expect(delivery).toMatchObject({ state: "delivered", attempts: 3 });
    const detail = (await (await api(`/api/v1/webhooks/${flaky.id}/deliveries/${delivery.id}`, { cookie: admin })).json()) as { attemptLog: { status: number }[] };
    expect(detail.attemptLog.map((a) => a.status)).toEqual([500, 500, 200]);
  });

  it("a 410 disables the endpoint after one attempt, and later events are not sent to it (Standard Webhooks 1.0)", async () => {
    expect(forJob("/gone", jobId)).toHaveLength(1);
    const ep = await until(async () => {
      const e = (await (await api(`/api/v1/webhooks/${gone.id}`, { cookie: admin })).json()) as { enabled: boolean; disabledReason: string | null };
      return e.enabled ? undefined : e;
    });
    expect(ep.disabledReason).toMatch(/410/);
    const next = (await finishedJob(stack().demoKeySecret, 5)).job.id;
    await until(() => forJob("/ok", next).length >= 1 || undefined);
    await new Promise((r) => setTimeout(r, 500));
    expect(forJob("/gone", next)).toHaveLength(0);
  });

  it("after a secret rotation both signatures are sent; the old and the new secret each verify (Standard Webhooks 1.0)", async () => {
    const rot = await api(`/api/v1/webhooks/${ok.id}/rotate-secret`, { method: "POST", cookie: admin, body: { overlapHours: 1 } });
    expect(rot.status).toBe(200);
    const fresh = ((await rot.json()) as { secret: string }).secret;
    const next = (await finishedJob(stack().demoKeySecret, 5)).job.id;
    const [d] = await until(() => { const r = forJob("/ok", next); return r.length ? r : undefined; });
    expect(d.headers["webhook-signature"].split(" ")).toHaveLength(2);
    expect(() => new Webhook(ok.secret).verify(d.body, d.headers)).not.toThrow();
    expect(() => new Webhook(fresh).verify(d.body, d.headers)).not.toThrow();
  });

  it("redelivery sends the same message again under a new webhook-id (derived)", async () => {
    const [first] = forJob("/ok", jobId);
    const before = forJob("/ok", jobId).length;
    const res = await api(`/api/v1/webhooks/${ok.id}/deliveries/${first.headers["webhook-id"]}/redeliver`, { method: "POST", cookie: admin });
    expect(res.status).toBe(202);
    const again = await until(() => { const r = forJob("/ok", jobId); return r.length > before ? r[r.length - 1] : undefined; });
    expect(again.body).toBe(first.body);
    expect(again.headers["webhook-id"]).not.toBe(first.headers["webhook-id"]);
  });

  it("the secret is shown once: no listing or read of an endpoint contains it (derived)", async () => {
    const text = await (await api("/api/v1/webhooks", { cookie: admin })).text() + await (await api(`/api/v1/webhooks/${ok.id}`, { cookie: admin })).text();
    expect(text).not.toContain(ok.secret.slice(6));
    expect(text).not.toContain("whsec_");
  });

  it("the database holds the secrets only sealed (derived)", async () => {
    const pool = ownerPool();
    try {
      const { rows } = await pool.query<{ sealed_secret: string }>("SELECT sealed_secret FROM webhook_endpoints WHERE id = $1", [flaky.id]);
      expect(rows[0].sealed_secret).toMatch(/^v1\./);
      expect(rows[0].sealed_secret).not.toContain(flaky.secret.slice(6, 20));
    } finally {
      await pool.end();
    }
  });

  it("an analyst may not manage webhooks (platform permission table)", async () => {
    const res = await api("/api/v1/webhooks", { key: stack().demoKeySecret });
    expect(res.status).toBe(403);
  });
});
