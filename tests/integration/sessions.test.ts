// Console sessions: cookie flags, sign-out, sign-out everywhere, throttling, cross-site refusal, password rules.
import pg from "pg";
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { ACCOUNT_LIMIT } from "@/lib/auth/throttle";
import { ADMIN, api, createKey, inviteAndJoin, sessionCookieOf, signIn, stack, unique, waitForMail } from "@/tests/integration/client";

let app: pg.Pool;
let admin: string;
beforeAll(async () => {
  app = new pg.Pool({ connectionString: stack().env.DATABASE_URL, max: 1 });
  admin = await signIn(ADMIN);
});
afterAll(() => app.end());

const jti = (cookie: string) => JSON.parse(Buffer.from(cookie.split("=")[1].split(".")[1], "base64url").toString()).jti as string;

async function newMember(label: string, password = "session test pw") {
  const email = `${unique(label)}@tallow-creek.example`;
  const { cookie } = await inviteAndJoin(admin, email, "analyst", password);
  return { email, password, cookie };
}

describe("sessions", () => {
  it("the session cookie is HttpOnly, SameSite=Lax, Path=/ and short-lived; not Secure over plain HTTP (RFC 6265bis)", async () => {
    const res = await api("/api/v1/session", { method: "POST", body: { email: ADMIN, password: "rillscale-demo" } });
    expect(res.status).toBe(204);
    const set = res.headers.getSetCookie().find((h) => h.startsWith("rillscale_session="))!;
    expect(set).toMatch(/; HttpOnly/);
    expect(set).toMatch(/; SameSite=Lax/);
    expect(set).toMatch(/; Path=\//);
    expect(Number(/Max-Age=(\d+)/.exec(set)![1])).toBeLessThanOrEqual(3600);
    expect(set).not.toMatch(/Secure/); // __Host- and Secure apply when RILLSCALE_PUBLIC_URL is https
  });

  it("signing out revokes the session row, and the old cookie stops working (platform contract)", async () => {
    const cookie = await signIn(ADMIN);
    expect((await api("/api/v1/me", { cookie })).status).toBe(200);
    const out = await api("/api/v1/session", { method: "DELETE", cookie });
    expect(out.status).toBe(204);
    expect(out.headers.getSetCookie().join()).toMatch(/rillscale_session=; .*Max-Age=0/);
    const { rows } = await app.query("SELECT revoked_at FROM sessions WHERE id = $1", [jti(cookie)]);
    expect(rows[0].revoked_at).not.toBeNull();
    expect((await api("/api/v1/me", { cookie })).status).toBe(401);
  });

  it("signing out everywhere ends every session of the user (platform contract)", async () => {
    const m = await newMember("everywhere");
    const second = await signIn(m.email, m.password);
    expect((await api("/api/v1/sessions", { method: "DELETE", cookie: second })).status).toBe(204);
    expect((await api("/api/v1/me", { cookie: m.cookie })).status).toBe(401);
    expect((await api("/api/v1/me", { cookie: second })).status).toBe(401);
  });

  it(`after ${ACCOUNT_LIMIT.failures} wrong passwords the account answers 429 with Retry-After, even to the right one (OWASP ASVS 2.2.1)`, async () => {
    const m = await newMember("throttled");
    for (let i = 0; i < ACCOUNT_LIMIT.failures; i++) {
      expect((await api("/api/v1/session", { method: "POST", body: { email: m.email, password: "not it at all" } })).status).toBe(401);
    }
    for (const password of ["not it at all", m.password]) {
      const res = await api("/api/v1/session", { method: "POST", body: { email: m.email, password } });
      expect(res.status).toBe(429);
      const wait = Number(res.headers.get("retry-after"));
      expect(wait).toBeGreaterThan(0);
      expect(wait).toBeLessThanOrEqual(ACCOUNT_LIMIT.lockMs / 1000);
      expect(((await res.json()) as { type: string }).type).toMatch(/too-many-requests$/);
    }
  });

  it("an unknown e-mail gets the same answer as a wrong password (OWASP authentication cheat sheet)", async () => {
    const strip = async (r: Response) => {
      const { request_id: _ignored, ...rest } = (await r.json()) as Record<string, unknown>;
      return { status: r.status, ...rest };
    };
    const known = await api("/api/v1/session", { method: "POST", body: { email: "analyst@tallow-creek.example", password: "wrong password" } });
    const unknown = await api("/api/v1/session", { method: "POST", body: { email: `${unique("ghost")}@nowhere.example`, password: "wrong password" } });
    expect(await strip(unknown)).toEqual(await strip(known));
    await signIn("analyst@tallow-creek.example"); // clears the analyst's failure count
  });

  it("an unknown e-mail costs about as much time as a wrong password: a dummy bcrypt hash is checked (OWASP authentication cheat sheet)", async () => {
    const m = await newMember("timing");
    const time = async (email: string) => {
      const t = performance.now();
      expect((await api("/api/v1/session", { method: "POST", body: { email, password: "wrong password" } })).status).toBe(401);
      return performance.now() - t;
    };
    const median = (xs: number[]) => [...xs].sort((a, b) => a - b)[Math.floor(xs.length / 2)];
    const known: number[] = [];
    const unknown: number[] = [];
    // Fewer than the account limit, so the known account is not locked; interleaved so load affects both alike.
    for (let i = 0; i < ACCOUNT_LIMIT.failures - 1; i++) {
      known.push(await time(m.email));
      unknown.push(await time(`${unique("ghost")}@nowhere.example`));
    }
    const ratio = median(unknown) / median(known);
    expect(ratio).toBeGreaterThan(0.5);
    expect(ratio).toBeLessThan(2);
  });

  it("cookie-authenticated mutations from another site are refused; API-key requests are exempt (OWASP CSRF cheat sheet)", async () => {
    const body = { name: "csrf", scopes: ["jobs:read"] };
    const evil = await api("/api/v1/keys", { method: "POST", cookie: admin, body, headers: { origin: "https://evil.example" } });
    expect(evil.status).toBe(403);
    expect(((await evil.json()) as { type: string }).type).toMatch(/cross-site$/);
    const fetchSite = await api("/api/v1/keys", { method: "POST", cookie: admin, body, headers: { "sec-fetch-site": "cross-site" } });
    expect(fetchSite.status).toBe(403);
    const same = await api("/api/v1/keys", { method: "POST", cookie: admin, body, headers: { origin: stack().url, "sec-fetch-site": "same-origin" } });
    expect(same.status).toBe(201);
    const { secret } = await createKey(admin, ["admin"], "csrf exempt");
    const withKey = await api("/api/v1/keys", { method: "POST", key: secret, body, headers: { origin: "https://evil.example", "sec-fetch-site": "cross-site" } });
    expect(withKey.status).toBe(201);
    const login = await api("/api/v1/session", { method: "POST", body: { email: ADMIN, password: "rillscale-demo" }, headers: { origin: "https://evil.example" } });
    expect(login.status).toBe(403);
  });

  it("password reset: the e-mailed link works once, sets the new password and ends old sessions (platform contract)", async () => {
    const m = await newMember("reset");
    expect((await api("/api/v1/password-resets", { method: "POST", body: { email: m.email } })).status).toBe(202);
    expect((await api("/api/v1/password-resets", { method: "POST", body: { email: `${unique("nobody")}@nowhere.example` } })).status).toBe(202);
    const mail = await waitForMail((x) => x.to.includes(m.email) && x.subject.startsWith("Reset"));
    const link = new URL(/https?:\/\/\S+reset-password\?token=\S+/.exec(mail.text)![0]);
    expect(link.origin).toBe(stack().url);
    const token = link.searchParams.get("token")!;
    const tooLong = await api("/api/v1/password-resets/confirm", { method: "POST", body: { token, password: "é".repeat(37) } });
    expect(tooLong.status).toBe(422);
    const problem = (await tooLong.json()) as { errors: { pointer: string; detail: string }[] };
    expect(problem.errors[0]).toMatchObject({ pointer: "/password" });
    expect(problem.errors[0].detail).toMatch(/72 bytes/);
    expect((await api("/api/v1/password-resets/confirm", { method: "POST", body: { token, password: "a brand new password" } })).status).toBe(204);
    expect((await api("/api/v1/password-resets/confirm", { method: "POST", body: { token, password: "another new password" } })).status).toBe(422);
    expect((await api("/api/v1/me", { cookie: m.cookie })).status).toBe(401);
    const res = await api("/api/v1/session", { method: "POST", body: { email: m.email, password: "a brand new password" } });
    expect(res.status).toBe(204);
    expect(sessionCookieOf(res)).toMatch(/^rillscale_session=/);
  });
});
