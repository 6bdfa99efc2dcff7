// Joining and recovering an account in a real browser: an admin invites someone from the members page, the
// invitation arrives in the dev-mail page, the invitee joins with a name and password, later resets that
// password from the e-mailed link, and signs out.
import { type Browser, type BrowserContext, type Page } from "playwright-core";
import { afterAll, beforeAll, describe, expect, test } from "vitest";
import { baseUrl, DEMO_PASSWORD, launchChromium, signIn } from "./browser";

const ADMIN = "admin@tallow-creek.example";
const RUN = Date.now().toString(36);
const INVITEE = `river.ops.${RUN}@tallow-creek.example`;
const FIRST_PASSWORD = "gravel bar at low water";
const SECOND_PASSWORD = "riffle pool riffle pool";

let browser: Browser;
let admin: { context: BrowserContext; page: Page };

async function fresh(): Promise<{ context: BrowserContext; page: Page }> {
  const context = await browser.newContext({ viewport: { width: 1280, height: 800 } });
  return { context, page: await context.newPage() };
}

/** The link of the newest caught mail to `to` whose subject matches, read from the admin's dev-mail page. */
async function linkFromDevMail(to: string, subject: RegExp): Promise<string> {
  const { page } = admin;
  await page.goto(`${baseUrl()}/dev/mail`);
  const row = page.getByRole("row").filter({ hasText: to }).filter({ hasText: subject }).first();
  await expect.poll(() => row.count(), { timeout: 15_000 }).toBeGreaterThan(0);
  await row.getByRole("button", { name: "Read" }).click();
  const href = await page.getByRole("link", { name: /^https?:\/\// }).first().getAttribute("href");
  if (href === null) throw new Error(`no link in the mail to ${to}`);
  return href;
}

beforeAll(async () => {
  browser = await launchChromium();
  admin = await fresh();
  await signIn(admin.page, ADMIN, DEMO_PASSWORD);
  await admin.page.getByRole("navigation", { name: "Console" }).waitFor();
});

afterAll(async () => {
  await browser?.close();
});

describe("console: invitation, password reset and sign-out", () => {
  test("an invitation sent from the members page is listed as pending and arrives with a link", async () => {
    const { page } = admin;
    await page.goto(`${baseUrl()}/members`);
    const form = page.getByRole("form", { name: "Invite a member" });
    await form.getByLabel("E-mail").fill(INVITEE);
    await form.getByLabel("Role").selectOption("analyst");
    await form.getByRole("button", { name: "Send invitation" }).click();
    await form.getByText(`Invitation sent to ${INVITEE}`).waitFor();
    await expect
      .poll(async () => (await page.getByRole("table", { name: "Pending invitations" }).textContent()) ?? "")
      .toContain(INVITEE);
    const link = await linkFromDevMail(INVITEE, /invited/);
    expect(new URL(link).pathname).toBe("/accept-invite");
  });

  test("the invitee joins from the link with a name and password and lands in the console as an analyst", async () => {
    const link = await linkFromDevMail(INVITEE, /invited/);
    const { context, page } = await fresh();
    await page.goto(link);
    await page.getByLabel("Your name").fill("River Operations");
    await page.getByLabel("New password").fill(FIRST_PASSWORD);
    // The one check the API cannot make: both password fields must match (derived).
    await page.getByLabel("Repeat password").fill(`${FIRST_PASSWORD}!`);
    await page.getByRole("button", { name: "Join" }).click();
    await page.getByText("does not match the password").waitFor();
    await page.getByLabel("Repeat password").fill(FIRST_PASSWORD);
    await page.getByRole("button", { name: "Join" }).click();
    await page.getByRole("heading", { name: "Your role: analyst" }).waitFor();
    // Permission table: an analyst manages neither keys nor members and cannot read the audit log.
    const nav = page.getByRole("navigation", { name: "Console" });
    for (const hidden of ["API keys", "Members", "Audit log", "Dev mail"]) {
      expect(await nav.getByRole("link", { name: hidden }).count()).toBe(0);
    }
    await context.close();
  });

  test("a password reset link from the e-mail sets a new password; the old one stops working", async () => {
    const { context, page } = await fresh();
    await page.goto(`${baseUrl()}/reset-password`);
    await page.getByLabel("E-mail").fill(INVITEE);
    await page.getByRole("button", { name: "Send reset link" }).click();
    await page.getByText("a reset link is on its way").waitFor();

    await page.goto(await linkFromDevMail(INVITEE, /Reset/));
    await page.getByLabel("New password").fill(SECOND_PASSWORD);
    await page.getByLabel("Repeat password").fill(SECOND_PASSWORD);
    await page.getByRole("button", { name: "Set password" }).click();
    await page.getByText("Your password is changed").waitFor();

    await signIn(page, INVITEE, FIRST_PASSWORD);
    await page.getByRole("alert").filter({ hasText: /wrong/i }).waitFor();
    await signIn(page, INVITEE, SECOND_PASSWORD);
    await page.getByRole("heading", { name: "Your role: analyst" }).waitFor();
    await context.close();
  });

  test("signing out returns to the sign-in page, and console pages then ask to sign in again", async () => {
    const { context, page } = await fresh();
    await signIn(page, INVITEE, SECOND_PASSWORD);
    await page.getByRole("button", { name: "Sign out", exact: true }).click();
    await page.waitForURL(/\/sign-in$/);
    await page.goto(`${baseUrl()}/members`);
    await page.waitForURL(/\/sign-in\?next=%2Fmembers$/);
    await context.close();
  });
});
