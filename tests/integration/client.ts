// Helpers for integration tests: calls against the started test server, sign-in, caught mail, and direct
// database handles (app role and owner role) on the test database.
import pg from "pg";
import { inject } from "vitest";
import { makeDb } from "@/db/client";
import { DEMO_PASSWORD } from "@/db/seed";
import { readCaughtMail, type CaughtMail } from "@/lib/mail/store";

export const stack = () => inject("rillscale");

export interface Call {
  method?: string;
  body?: unknown;
  cookie?: string;
  key?: string;
  headers?: Record<string, string>;
}

export async function api(path: string, c: Call = {}): Promise<Response> {
  const headers: Record<string, string> = { ...c.headers };
  if (c.body !== undefined) headers["content-type"] = "application/json";
  if (c.cookie) headers.cookie = c.cookie;
  if (c.key) headers.authorization = `Bearer ${c.key}`;
  return fetch(`${stack().url}${path}`, { method: c.method ?? "GET", headers, body: c.body === undefined ? undefined : JSON.stringify(c.body), redirect: "manual" });
}

/** The `name=value` part of the session cookie a response sets. */
export function sessionCookieOf(res: Response): string {
  const set = res.headers.getSetCookie().find((h) => h.includes("rillscale_session="));
  if (!set) throw new Error(`no session cookie in the response (status ${res.status})`);
  return set.split(";")[0];
}

export async function signIn(email: string, password = DEMO_PASSWORD): Promise<string> {
  const res = await api("/api/v1/session", { method: "POST", body: { email, password } });
  if (res.status !== 204) throw new Error(`sign-in of ${email} answered ${res.status}: ${await res.text()}`);
  return sessionCookieOf(res);
}

export async function waitForMail(match: (m: CaughtMail) => boolean, timeoutMs = 10_000): Promise<CaughtMail> {
  const deadline = Date.now() + timeoutMs;
  for (;;) {
    const found = readCaughtMail(stack().mailDir).find(match);
    if (found) return found;
    if (Date.now() > deadline) throw new Error("the expected mail did not arrive at the catcher");
    await new Promise((r) => setTimeout(r, 100));
  }
}

/** A Drizzle handle as the app role, plus its pool (end it in afterAll). */
export function appDb(logQuery?: (sql: string) => void) {
  const pool = new pg.Pool({ connectionString: stack().env.DATABASE_URL, max: 2 });
  return { pool, db: makeDb(pool, logQuery) };
}

export function ownerPool() {
  return new pg.Pool({ connectionString: stack().ownerUrl, max: 1 });
}

export const ADMIN = "admin@tallow-creek.example";
export const ANALYST = "analyst@tallow-creek.example";
export const AUDITOR = "auditor@tallow-creek.example";
export const OTHER_ADMIN = "admin@brackenridge.example";

/** Invites `email` as `role` (as the signed-in admin), follows the e-mailed link's token, and joins. */
export async function inviteAndJoin(adminCookie: string, email: string, role: string, password = "correct horse battery"): Promise<{ cookie: string; token: string }> {
  const inv = await api("/api/v1/invitations", { method: "POST", cookie: adminCookie, body: { email, role } });
  if (inv.status !== 201) throw new Error(`invitation of ${email} answered ${inv.status}: ${await inv.text()}`);
  const mail = await waitForMail((m) => m.to.includes(email) && m.subject.startsWith("You are invited"));
  const token = new URL(/https?:\/\/\S+accept-invite\?token=\S+/.exec(mail.text)![0]).searchParams.get("token")!;
  const res = await api("/api/v1/invitations/accept", { method: "POST", body: { token, name: email.split("@")[0], password } });
  if (res.status !== 204) throw new Error(`accepting the invitation of ${email} answered ${res.status}: ${await res.text()}`);
  return { cookie: sessionCookieOf(res), token };
}

export async function createKey(cookie: string, scopes: string[], name = `key ${scopes.join(",")}`): Promise<{ id: string; secret: string }> {
  const res = await api("/api/v1/keys", { method: "POST", cookie, body: { name, scopes } });
  if (res.status !== 201) throw new Error(`key creation answered ${res.status}: ${await res.text()}`);
  const body = (await res.json()) as { key: { id: string }; secret: string };
  return { id: body.key.id, secret: body.secret };
}

export const unique = (label: string) => `${label}-${Date.now().toString(36)}${Math.floor(Math.random() * 1e6).toString(36)}`;
