// The API key life cycle against the started server and, where time must move, in-process with an injectable clock.
import { spawnSync } from "node:child_process";
import { afterAll, describe, expect, it } from "vitest";
import { authenticateApiKey, hashKey, newKeySecret } from "@/lib/auth/api-keys";
import { fixedClock, systemClock } from "@/lib/auth/clock";
import { ADMIN, OTHER_ADMIN, api, appDb, signIn, stack, unique, waitForMail } from "@/tests/integration/client";

const handles: { pool: { end(): Promise<void> } }[] = [];
afterAll(async () => Promise.all(handles.map((h) => h.pool.end())));

function db(logQuery?: (sql: string) => void) {
  const h = appDb(logQuery);
  handles.push(h);
  return h.db;
}

const pepper = () => stack().env.RILLSCALE_KEY_PEPPER;
const me = (key: string) => api("/api/v1/me", { key });
const secrets: string[] = [];

describe("API key life cycle", () => {
  it("create → use → rotate → old works in the grace period and not after → revoke refuses both at once (STANDARDS.md)", async () => {
    const admin = await signIn(ADMIN);
    const name = unique("life cycle");
    const created = await api("/api/v1/keys", { method: "POST", cookie: admin, body: { name, scopes: ["jobs:read"] } });
    expect(created.status).toBe(201);
    const { key, secret: first } = (await created.json()) as { key: { id: string; lastUsedAt: string | null }; secret: string };
    secrets.push(first);
    expect(key.lastUsedAt).toBeNull();

    const used = await me(first);
    expect(used.status).toBe(200);
    expect(((await used.json()) as { kind: string; scopes: string[] }).scopes).toEqual(["jobs:read"]);
    const listed = (await (await api("/api/v1/keys", { cookie: admin })).json()) as { items: { id: string; lastUsedAt: string | null }[] };
    expect(listed.items.find((k) => k.id === key.id)!.lastUsedAt).not.toBeNull();

    const rotated = await api(`/api/v1/keys/${key.id}/rotate`, { method: "POST", cookie: admin });
    expect(rotated.status).toBe(200);
    const r = (await rotated.json()) as { key: { graceUntil: string; rotatedAt: string }; secret: string };
    const second = r.secret;
    secrets.push(second);
    const graceHours = (Date.parse(r.key.graceUntil) - Date.parse(r.key.rotatedAt)) / 3_600_000;
    expect(graceHours).toBeCloseTo(24, 6); // the default grace (platform contract)
    expect((await me(first)).status).toBe(200);
    expect((await me(second)).status).toBe(200);

    // Past the grace period, with the clock moved rather than waiting a day.
    const after = fixedClock(new Date(Date.parse(r.key.graceUntil) + 1000));
    expect(await authenticateApiKey(db(), pepper(), first, after)).toEqual({ ok: false, reason: "grace_over" });
    expect((await authenticateApiKey(db(), pepper(), second, after)).ok).toBe(true);
    const before = fixedClock(new Date(Date.parse(r.key.graceUntil) - 1000));
    expect((await authenticateApiKey(db(), pepper(), first, before)).ok).toBe(true);

    const mail = await waitForMail((m) => m.subject === `API key rotated: ${name}`);
    expect(mail.to).toContain(ADMIN);

    const revoked = await api(`/api/v1/keys/${key.id}/revoke`, { method: "POST", cookie: admin });
    expect(revoked.status).toBe(200);
    for (const s of [first, second]) {
      const res = await me(s);
      expect(res.status).toBe(401);
      expect(res.headers.get("www-authenticate")).toContain('error="invalid_token"');
    }
    await waitForMail((m) => m.subject === `API key revoked: ${name}`);
    expect((await api(`/api/v1/keys/${key.id}/rotate`, { method: "POST", cookie: admin })).status).toBe(409);
  });

  it("a key past its expiry is refused (injectable clock; STANDARDS.md)", async () => {
    const admin = await signIn(ADMIN);
    const expiresAt = new Date(Date.now() + 3_600_000).toISOString();
    const res = await api("/api/v1/keys", { method: "POST", cookie: admin, body: { name: unique("expiring"), scopes: ["jobs:read"], expiresAt } });
    const { secret } = (await res.json()) as { secret: string };
    secrets.push(secret);
    expect((await authenticateApiKey(db(), pepper(), secret, systemClock)).ok).toBe(true);
    expect(await authenticateApiKey(db(), pepper(), secret, fixedClock(new Date(Date.parse(expiresAt) + 1)))).toEqual({ ok: false, reason: "expired" });
    const past = await api("/api/v1/keys", { method: "POST", cookie: admin, body: { name: "past", scopes: ["jobs:read"], expiresAt: "2020-01-01T00:00:00Z" } });
    expect(past.status).toBe(422);
  });

  it("a key with a wrong checksum is refused without a single database query (STANDARDS.md)", async () => {
    const queries: string[] = [];
    const counting = db((q) => queries.push(q));
    const good = stack().demoKeySecret;
    const bad = good.slice(0, -1) + (good.endsWith("0") ? "1" : "0");
    expect(await authenticateApiKey(counting, pepper(), bad, systemClock)).toEqual({ ok: false, reason: "malformed" });
    expect(queries).toEqual([]);
    expect((await authenticateApiKey(counting, pepper(), good, systemClock)).ok).toBe(true);
    expect(queries.length).toBeGreaterThan(0); // the counter does see queries
    expect((await me(bad)).status).toBe(401);
  });

  it("a well-formed key that was never issued is refused (derived)", async () => {
    expect((await me(newKeySecret("ZZZZZZZZZZZZ"))).status).toBe(401);
    expect((await api("/api/v1/me", { headers: { authorization: "Basic abc" } })).status).toBe(401);
  });

  it("the database never holds a key's plaintext, only its HMAC: a pg_dump of the test database does not contain it (STANDARDS.md)", () => {
    const dump = spawnSync("/usr/lib/postgresql/15/bin/pg_dump", ["--data-only", stack().superUrl], { encoding: "utf8", maxBuffer: 256 * 1024 * 1024 });
    expect(dump.status, dump.stderr).toBe(0);
    const all = [...secrets, stack().demoKeySecret];
    expect(all.length).toBeGreaterThanOrEqual(4);
    for (const s of all) {
      expect(dump.stdout.includes(s)).toBe(false);
      expect(dump.stdout.includes(s.slice(17, 39))).toBe(false); // the random part alone
    }
    expect(dump.stdout.includes(hashKey(pepper(), stack().demoKeySecret))).toBe(true);
  });

  it("a key of another organisation cannot see or change this organisation's keys (STANDARDS.md)", async () => {
    const other = await signIn(OTHER_ADMIN);
    const list = (await (await api("/api/v1/keys", { cookie: other })).json()) as { items: { name: string }[] };
    expect(list.items.some((k) => k.name === "demo script")).toBe(false);
  });
});
