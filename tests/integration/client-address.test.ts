// The client address the API records and throttles by is the socket's peer (scripts/web-server.ts appends it to
// X-Forwarded-For), never an address the client names itself: with no trusted proxy, a forged header changes nothing.
import pg from "pg";
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { ADDRESS_LIMIT, addressBucket } from "@/lib/auth/throttle";
import { ADMIN, AUDITOR, api, createKey, ownerPool, signIn } from "@/tests/integration/client";

// The test server listens on 127.0.0.1, so that is every request's peer (derived).
const PEER = "127.0.0.1";
let owner: pg.Pool;
const clearAddressBucket = () => owner.query("DELETE FROM login_throttles WHERE bucket = $1", [addressBucket(PEER)]);

beforeAll(() => {
  owner = ownerPool();
});
afterAll(async () => {
  // Later suites sign in from the same address.
  await clearAddressBucket();
  await owner.end();
});

describe("client address", () => {
  it("an audited action sent with a forged X-Forwarded-For records the peer's address, not the forged one (derived)", async () => {
    const admin = await signIn(ADMIN);
    const res = await api("/api/v1/keys", {
      method: "POST", cookie: admin, body: { name: "forged address", scopes: ["jobs:read"] }, headers: { "x-forwarded-for": "203.0.113.9" },
    });
    expect(res.status).toBe(201);
    const { key } = (await res.json()) as { key: { id: string } };
    const page = (await (await api("/api/v1/audit?action=api_key.created&limit=200", { cookie: await signIn(AUDITOR) })).json()) as {
      items: { target: string | null; ip: string | null }[];
    };
    expect(page.items.find((e) => e.target === `api_key:${key.id}`)?.ip).toBe(PEER);
    await createKey(admin, ["jobs:read"], "unforged"); // the ordinary path still works
  });

  it(`failed sign-ins with a different forged X-Forwarded-For each still lock the address after ${ADDRESS_LIMIT.failures} (OWASP ASVS 2.2.1)`, async () => {
    await clearAddressBucket();
    const statuses: number[] = [];
    for (let i = 0; i <= ADDRESS_LIMIT.failures; i++) {
      // A new e-mail each time, so only the address bucket can fill.
      const res = await api("/api/v1/session", {
        method: "POST", body: { email: `nobody-${i}@forged.example`, password: "wrong password" }, headers: { "x-forwarded-for": `198.51.100.${i % 250}` },
      });
      statuses.push(res.status);
    }
    expect(statuses.slice(0, ADDRESS_LIMIT.failures).every((s) => s === 401)).toBe(true);
    expect(statuses[ADDRESS_LIMIT.failures]).toBe(429);
  }, 120_000);
});
