// The console in a real browser against the started server, worker and test database: an admin's key
// life cycle driven through the pages, checked from outside with the key itself, then the auditor's view.
import { mkdirSync } from "node:fs";
import path from "node:path";
import { type Browser, type BrowserContext, type Page } from "playwright-core";
import { afterAll, beforeAll, describe, expect, test } from "vitest";
import { baseUrl, launchChromium, SCREENSHOTS, signIn } from "./browser";

const ADMIN = "admin@tallow-creek.example";
const AUDITOR = "auditor@tallow-creek.example";
const KEY_NAME = `console check ${Date.now().toString(36)}`;
const KEY_SCOPES = ["jobs:read", "results:read"];
// The actions the key handlers write (lib/auth/key-admin.ts), each with target `api_key:<id>`.
const AUDIT_ACTIONS = ["api_key.created", "api_key.rotated", "api_key.revoked"];

async function meWithKey(secret: string): Promise<Response> {
  return fetch(`${baseUrl()}/api/v1/me`, { headers: { authorization: `Bearer ${secret}` } });
}

let browser: Browser;
/** Id of the key the admin creates, read from GET /api/v1/keys in the admin's browser session. */
let keyId = "";

async function signedInPage(email: string): Promise<{ context: BrowserContext; page: Page }> {
  const context = await browser.newContext({ viewport: { width: 1360, height: 860 } });
  await context.grantPermissions(["clipboard-read", "clipboard-write"], { origin: baseUrl() });
  const page = await context.newPage();
  await signIn(page, email);
  await page.getByRole("navigation", { name: "Console" }).waitFor();
  return { context, page };
}

beforeAll(async () => {
  mkdirSync(SCREENSHOTS, { recursive: true });
  browser = await launchChromium();
});

afterAll(async () => {
  await browser?.close();
});

describe("console: an admin's API key life cycle, then the auditor's view", () => {
  let admin: { context: BrowserContext; page: Page };
  let firstSecret = "";
  let secondSecret = "";

  beforeAll(async () => {
    admin = await signedInPage(ADMIN);
  });

  afterAll(async () => {
    await admin?.context.close();
  });

  test("the admin creates a key on the keys page and its shown-once secret authenticates /api/v1/me", async () => {
    const { page } = admin;
    await page.getByRole("navigation", { name: "Console" }).getByRole("link", { name: "API keys" }).click();
    await page.getByRole("button", { name: "Create key" }).click();
    const dialog = page.getByRole("dialog", { name: "Create an API key" });
    await dialog.getByLabel("Name").fill(KEY_NAME);
    for (const scope of KEY_SCOPES) await dialog.getByRole("checkbox", { name: scope }).check();
    await dialog.getByRole("button", { name: "Create", exact: true }).click();

    const shown = page.getByRole("dialog", { name: `Key “${KEY_NAME}” created` });
    firstSecret = await shown.getByLabel("Secret").inputValue();
    // The copy button puts exactly the shown secret on the clipboard (loopback is a secure context).
    await shown.getByRole("button", { name: "Copy secret" }).click();
    await shown.getByRole("button", { name: "Copied" }).waitFor();
    expect(await page.evaluate(() => navigator.clipboard.readText())).toBe(firstSecret);
    await shown.getByRole("button", { name: "I have stored it" }).click();
    keyId = await page.evaluate(async (name) => {
      const list = (await (await fetch("/api/v1/keys")).json()) as { items: { id: string; name: string }[] };
      return list.items.find((k) => k.name === name)?.id ?? "";
    }, KEY_NAME);
    expect(keyId).not.toBe("");

    // Contract: GET /api/v1/me with a key → 200, kind api_key, the key's org and scopes.
    const response = await meWithKey(firstSecret);
    expect(response.status).toBe(200);
    const me = (await response.json()) as { kind: string; org: { slug: string }; scopes: string[] };
    expect(me.kind).toBe("api_key");
    expect(me.org.slug).toBe("tallow-creek");
    expect([...me.scopes].sort()).toEqual([...KEY_SCOPES].sort());
    await expect
      .poll(async () => (await page.getByRole("row", { name: new RegExp(KEY_NAME) }).textContent()) ?? "")
      .toContain("Active");
  });

  test("rotating gives a new secret that works while the old one keeps working inside the grace period", async () => {
    const { page } = admin;
    await page.getByRole("button", { name: `Rotate ${KEY_NAME}` }).click();
    const confirm = page.getByRole("dialog", { name: `Rotate “${KEY_NAME}”?` });
    await expect.poll(() => confirm.getByLabel("Grace period (hours)").inputValue()).toBe("24");
    await confirm.getByRole("button", { name: "Rotate key" }).click();
    const shown = page.getByRole("dialog", { name: `New secret for “${KEY_NAME}”` });
    secondSecret = await shown.getByLabel("Secret").inputValue();
    await shown.getByRole("button", { name: "I have stored it" }).click();

    expect(secondSecret).not.toBe(firstSecret);
    // Issue 2: the new secret works; the old one still works within the (default 24 h) grace period.
    expect((await meWithKey(secondSecret)).status).toBe(200);
    expect((await meWithKey(firstSecret)).status).toBe(200);
    await expect
      .poll(async () => (await page.getByRole("row", { name: new RegExp(KEY_NAME) }).textContent()) ?? "")
      .toContain("old secret valid until");
  });

  test("revoking refuses both secrets at once with 401 and a Bearer challenge", async () => {
    const { page } = admin;
    await page.getByRole("button", { name: `Revoke ${KEY_NAME}` }).click();
    await page.getByRole("dialog", { name: `Revoke “${KEY_NAME}”?` }).getByRole("button", { name: "Revoke key" }).click();
    await expect
      .poll(async () => (await page.getByRole("row", { name: new RegExp(KEY_NAME) }).textContent()) ?? "")
      .toContain("Revoked");
    // RFC 6750 §3 via STANDARDS.md: a revoked key → 401 with WWW-Authenticate: Bearer.
    for (const secret of [secondSecret, firstSecret]) {
      const response = await meWithKey(secret);
      expect(response.status).toBe(401);
      expect(response.headers.get("www-authenticate") ?? "").toMatch(/^Bearer/);
    }
    await page.screenshot({ path: path.join(SCREENSHOTS, "keys-admin.png"), fullPage: true });
  });
});

describe("console: the auditor", () => {
  let auditor: { context: BrowserContext; page: Page };

  beforeAll(async () => {
    auditor = await signedInPage(AUDITOR);
  });

  afterAll(async () => {
    await auditor?.context.close();
  });

  test("sees the key's creation, rotation and revocation in the audit log", async () => {
    const { page } = auditor;
    await page.getByRole("navigation", { name: "Console" }).getByRole("link", { name: "Audit log" }).click();
    const table = page.getByRole("table", { name: "Audit entries" });
    await table.waitFor();
    for (const action of AUDIT_ACTIONS) {
      await expect
        .poll(async () => (await table.getByRole("row").filter({ hasText: action }).allTextContents()).join("\n"))
        .toContain(`api_key:${keyId}`);
    }
    await page.screenshot({ path: path.join(SCREENSHOTS, "audit-auditor.png"), fullPage: true });
  });

  test("finds no key actions on the keys page, and the API refuses them too", async () => {
    const { page } = auditor;
    // Keys are not in the auditor's navigation; the page itself is still reachable by address.
    expect(await page.getByRole("navigation", { name: "Console" }).getByRole("link", { name: "API keys" }).count()).toBe(0);
    await page.goto(`${baseUrl()}/keys`);
    await page.getByText("cannot create, rotate or revoke API keys").waitFor();
    for (const name of ["Create key", `Rotate ${KEY_NAME}`, `Revoke ${KEY_NAME}`]) {
      expect(await page.getByRole("button", { name }).count()).toBe(0);
    }
    // Permission table (lib/auth/permissions.ts): auditors lack keys:manage, so the API answers 403.
    const status = await page.evaluate(async () => {
      const r = await fetch("/api/v1/keys", {
        method: "POST",
        headers: { "content-type": "application/json" },
        body: JSON.stringify({ name: "auditor attempt", scopes: ["jobs:read"] }),
      });
      return r.status;
    });
    expect(status).toBe(403);
    await page.screenshot({ path: path.join(SCREENSHOTS, "keys-auditor.png"), fullPage: true });
  });
});
