// The audit log is append-only for the application role, tamper-evident through its hash chain, and readable
// by admins and auditors.
import pg from "pg";
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { ADMIN, AUDITOR, OTHER_ADMIN, api, createKey, ownerPool, signIn, stack } from "@/tests/integration/client";

let app: pg.Pool;
let owner: pg.Pool;
beforeAll(() => {
  app = new pg.Pool({ connectionString: stack().env.DATABASE_URL, max: 1 });
  owner = ownerPool();
});
afterAll(async () => {
  await app.end();
  await owner.end();
});

describe("audit log", () => {
  it("records sign-in failures and key changes, newest first, filterable by action and paged by cursor (issue 2)", async () => {
    await api("/api/v1/session", { method: "POST", body: { email: ADMIN, password: "wrong password" } });
    const admin = await signIn(ADMIN);
    const { id } = await createKey(admin, ["jobs:read"], "audited");
    await api(`/api/v1/keys/${id}/rotate`, { method: "POST", cookie: admin });
    await api(`/api/v1/keys/${id}/revoke`, { method: "POST", cookie: admin });
    const auditor = await signIn(AUDITOR);
    const page = (await (await api("/api/v1/audit?limit=200", { cookie: auditor })).json()) as { items: { id: string; action: string; target: string | null }[] };
    const actions = page.items.filter((e) => e.target === `api_key:${id}`).map((e) => e.action);
    expect(actions).toEqual(["api_key.revoked", "api_key.rotated", "api_key.created"]);
    expect(page.items.some((e) => e.action === "session.sign_in_failed")).toBe(true);
    const ids = page.items.map((e) => Number(e.id));
    expect([...ids].sort((a, b) => b - a)).toEqual(ids);

    const filtered = (await (await api("/api/v1/audit?action=api_key.rotated", { cookie: auditor })).json()) as { items: { action: string }[] };
    expect(filtered.items.length).toBeGreaterThan(0);
    expect(filtered.items.every((e) => e.action === "api_key.rotated")).toBe(true);

    const first = (await (await api("/api/v1/audit?limit=2", { cookie: auditor })).json()) as { items: { id: string }[]; nextCursor: string };
    const second = (await (await api(`/api/v1/audit?limit=2&cursor=${first.nextCursor}`, { cookie: auditor })).json()) as { items: { id: string }[] };
    expect(second.items.map((e) => e.id)).toEqual(ids.slice(2, 4).map(String));
    expect((await api("/api/v1/audit?limit=0", { cookie: auditor })).status).toBe(422);
    expect((await api("/api/v1/audit?cursor=abc", { cookie: auditor })).status).toBe(422);
  });

  it("the application role cannot UPDATE, DELETE or TRUNCATE audit rows (issue 2)", async () => {
    await expect(app.query("UPDATE audit_events SET action = 'x'")).rejects.toThrow(/permission denied/);
    await expect(app.query("DELETE FROM audit_events")).rejects.toThrow(/permission denied/);
    await expect(app.query("TRUNCATE audit_events")).rejects.toThrow(/permission denied/);
  });

  it("the trigger refuses UPDATE and DELETE even for the owner role (issue 2)", async () => {
    await expect(owner.query("UPDATE audit_events SET action = 'x' WHERE id = (SELECT min(id) FROM audit_events)")).rejects.toThrow(/append-only/);
    await expect(owner.query("DELETE FROM audit_events WHERE id = (SELECT min(id) FROM audit_events)")).rejects.toThrow(/append-only/);
    await expect(owner.query("TRUNCATE audit_events")).rejects.toThrow(/append-only/);
  });

  it("the verifier finds the row the owner role edited behind the trigger's back (Haber & Stornetta 1991)", async () => {
    // Tampering happens in the second organisation so the demo organisation's chain stays intact for other suites.
    const other = await signIn(OTHER_ADMIN);
    await createKey(other, ["jobs:read"], "tamper target");
    const before = (await (await api("/api/v1/audit/verify", { cookie: other })).json()) as { ok: boolean; checked: number };
    expect(before.ok).toBe(true);
    expect(before.checked).toBeGreaterThanOrEqual(2);
    const { rows } = await owner.query(
      "SELECT a.id FROM audit_events a JOIN organisations o ON o.id = a.org_id WHERE o.slug = 'brackenridge' ORDER BY a.id LIMIT 1",
    );
    const client = await owner.connect();
    try {
      await client.query("BEGIN");
      await client.query("ALTER TABLE audit_events DISABLE TRIGGER audit_events_no_update_delete");
      await client.query("UPDATE audit_events SET actor_label = 'someone else' WHERE id = $1", [rows[0].id]);
      await client.query("ALTER TABLE audit_events ENABLE TRIGGER audit_events_no_update_delete");
      await client.query("COMMIT");
    } finally {
      client.release();
    }
    const after = (await (await api("/api/v1/audit/verify", { cookie: other })).json()) as { ok: boolean; firstBadId: string };
    expect(after).toMatchObject({ ok: false, firstBadId: String(rows[0].id) });
    const demo = (await (await api("/api/v1/audit/verify", { cookie: await signIn(AUDITOR) })).json()) as { ok: boolean };
    expect(demo.ok).toBe(true);
  });
});
