// What the browser suites share: Debian's Chromium with the platform contract's launch arguments (nothing
// downloaded, no background traffic), the started server's URL, and signing in through the page.
import path from "node:path";
import { fileURLToPath } from "node:url";
import { chromium, type Browser, type BrowserContext, type Page } from "playwright-core";

export const ROOT = path.resolve(path.dirname(fileURLToPath(import.meta.url)), "../..");
export const SCREENSHOTS = path.join(ROOT, ".data", "screenshots");
export const DEMO_PASSWORD = "rillscale-demo";

const CHROMIUM_ARGS = [
  "--no-sandbox",
  "--disable-gpu",
  "--disable-quic",
  "--no-first-run",
  "--disable-background-networking",
  "--disable-component-update",
  "--disable-sync",
];

export function launchChromium(): Promise<Browser> {
  return chromium.launch({ executablePath: "/usr/bin/chromium", args: CHROMIUM_ARGS });
}

export function baseUrl(): string {
  const url = process.env.RILLSCALE_TEST_URL;
  if (url === undefined) throw new Error("RILLSCALE_TEST_URL is not set: run through `npx vitest run --project e2e`");
  return url.replace(/\/$/, "");
}

/** Fills and sends the sign-in form; the caller waits for what it expects next. */
export async function signIn(page: Page, email: string, password = DEMO_PASSWORD): Promise<void> {
  await page.goto(`${baseUrl()}/sign-in`);
  await page.getByLabel("E-mail").fill(email);
  await page.getByLabel("Password").fill(password);
  await page.getByRole("button", { name: "Sign in" }).click();
}

export interface SignedIn {
  context: BrowserContext;
  page: Page;
}

/** A fresh context signed in as `email`, once the console's navigation shows; the caller closes the context. */
export async function signedInContext(browser: Browser, email: string, options: { clipboard?: boolean } = {}): Promise<SignedIn> {
  const context = await browser.newContext({ viewport: { width: 1360, height: 900 }, acceptDownloads: true });
  if (options.clipboard === true) await context.grantPermissions(["clipboard-read", "clipboard-write"], { origin: baseUrl() });
  const page = await context.newPage();
  await signIn(page, email);
  await page.getByRole("navigation", { name: "Console" }).waitFor();
  return { context, page };
}
