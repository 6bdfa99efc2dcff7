// Every /api/v1 operation × every kind of caller gives the status the OpenAPI document's x-permission implies.
import { randomUUID } from "node:crypto";
import { beforeAll, describe, expect, it } from "vitest";
import { OPERATIONS } from "@/openapi/registry";
import { SCOPES, can, scopeCan, type Permission, type Role, type Scope } from "@/lib/auth/permissions";
import { ADMIN, OTHER_ADMIN, api, createKey, inviteAndJoin, signIn, unique } from "@/tests/integration/client";

type Caller =
  | { label: string; kind: "none" }
  | { label: string; kind: "session"; role: Role; email: string; cookie: string }
  | { label: string; kind: "key"; scopes: Scope[]; secret: string; otherOrg: boolean };

const callers: Caller[] = [];
let targetKeyId = "";
let targetUserId = "";
const password = "matrix password 1";

beforeAll(async () => {
  const root = await signIn(ADMIN);
  callers.push({ label: "no credentials", kind: "none" });
  for (const role of ["admin", "analyst", "auditor"] as const) {
    // Own users, so signing them out does not touch the demo accounts other suites use.
    const email = `${unique(`matrix-${role}`)}@tallow-creek.example`;
    const { cookie } = await inviteAndJoin(root, email, role, password);
    callers.push({ label: `${role} session`, kind: "session", role, email, cookie });
  }
  for (const scope of SCOPES) {
    const { secret } = await createKey(root, [scope], `matrix ${scope}`);
    callers.push({ label: `key with ${scope}`, kind: "key", scopes: [scope], secret, otherOrg: false });
  }
  const other = await signIn(OTHER_ADMIN);
  callers.push({ label: "key of another org (admin scope)", kind: "key", scopes: ["admin"], secret: (await createKey(other, ["admin"], "matrix other org")).secret, otherOrg: true });
  targetKeyId = (await createKey(root, ["jobs:read"], "matrix target")).id;
  const members = (await (await api("/api/v1/members", { cookie: root })).json()) as { items: { userId: string; email: string }[] };
  targetUserId = members.items.find((m) => m.email === "analyst@tallow-creek.example")!.userId;
});

const SAMPLE_BODY: Record<string, () => unknown> = {
  "post /api/v1/session": () => ({}),
  "post /api/v1/password-resets": () => ({ email: "nobody@nowhere.example" }),
  "post /api/v1/password-resets/confirm": () => ({}),
  "post /api/v1/invitations/accept": () => ({}),
  "patch /api/v1/members/{userId}": () => ({ role: "analyst" }),
  "post /api/v1/invitations": () => ({ email: `${unique("matrix-invitee")}@elsewhere.example`, role: "auditor" }),
  "post /api/v1/keys": () => ({ name: "matrix made", scopes: ["jobs:read"] }),
  "post /api/v1/keys/{id}/rotate": () => ({ graceHours: 1 }),
};

// Public operations answer the same to everyone; these are what the sample bodies above produce.
const PUBLIC_STATUS: Record<string, number> = {
  "post /api/v1/session": 422,
  "post /api/v1/password-resets": 202,
  "post /api/v1/password-resets/confirm": 422,
  "post /api/v1/invitations/accept": 422,
  "get /api/v1/health": 200,
  "get /api/v1/openapi.json": 200,
};

const byId = (path: string) => path.includes("{");

function expected(op: (typeof OPERATIONS)[number], c: Caller): number {
  const id = `${op.method} ${op.path}`;
  if (op.auth === "public") return PUBLIC_STATUS[id];
  if (c.kind === "none") return 401;
  if (op.auth === "session") return c.kind === "session" ? op.ok.status : 403;
  if (op.auth === "any") return op.ok.status;
  const allowed = c.kind === "session" ? can(c.role, op.auth as Permission) : scopeCan(c.scopes, op.auth as Permission);
  if (!allowed) return 403;
  // Another organisation's key reaches this organisation's objects as if they did not exist.
  if (c.kind === "key" && c.otherOrg && byId(op.path)) return 404;
  // Removing the demo analyst would change the scenario; the matrix removes a random id instead.
  if (id === "delete /api/v1/members/{userId}") return 404;
  return op.ok.status;
}

// Sign-out operations last: they end the sessions the other rows use.
const ordered = [...OPERATIONS].sort((a, b) => Number(a.auth === "session") - Number(b.auth === "session"));

describe("permission matrix", () => {
  for (const op of ordered) {
    it(`${op.method.toUpperCase()} ${op.path} answers every caller as documented by its x-permission (${op.auth}) (platform contract, RFC 6750)`, async () => {
      const rows: string[] = [];
      for (const c of callers) {
        const id = `${op.method} ${op.path}`;
        const path = op.path
          .replace("{id}", targetKeyId)
          .replace("{userId}", id === "delete /api/v1/members/{userId}" ? randomUUID() : targetUserId);
        let cookie = c.kind === "session" ? c.cookie : undefined;
        if (op.auth === "session" && c.kind === "session") cookie = await signIn(c.email, password);
        const res = await api(path, {
          method: op.method.toUpperCase(), cookie, key: c.kind === "key" ? c.secret : undefined,
          body: SAMPLE_BODY[id]?.(),
        });
        const want = expected(op, c);
        if (res.status !== want) rows.push(`${c.label}: got ${res.status}, documented ${want} — ${await res.text()}`);
        if (res.status === 401) expect(res.headers.get("www-authenticate"), c.label).toMatch(/^Bearer/);
        if (res.status >= 400) expect(res.headers.get("content-type"), c.label).toBe("application/problem+json");
        expect(op.errors.includes(res.status) || res.status === op.ok.status || op.auth === "public", `${c.label}: ${res.status} is not documented`).toBe(true);
      }
      expect(rows).toEqual([]);
    });
  }

  it("another organisation's key id answers exactly like a random id: 404 with the same problem (STANDARDS.md)", async () => {
    const other = await signIn(OTHER_ADMIN);
    const a = await api(`/api/v1/keys/${targetKeyId}/revoke`, { method: "POST", cookie: other });
    const b = await api(`/api/v1/keys/NoSuchKey0000/revoke`, { method: "POST", cookie: other });
    const strip = async (r: Response) => {
      const { request_id: _ignored, ...rest } = (await r.json()) as Record<string, unknown>;
      return rest;
    };
    expect([a.status, b.status]).toEqual([404, 404]);
    expect(await strip(a)).toEqual(await strip(b));
    const m1 = await api(`/api/v1/members/${targetUserId}`, { method: "PATCH", cookie: other, body: { role: "auditor" } });
    const m2 = await api(`/api/v1/members/${randomUUID()}`, { method: "PATCH", cookie: other, body: { role: "auditor" } });
    expect([m1.status, m2.status]).toEqual([404, 404]);
    expect(await strip(m1)).toEqual(await strip(m2));
  });
});
