// The webhooks page in a real browser against the started server and worker: an admin registers an endpoint
// pointing at a loopback receiver in this test (the test stack sets RILLSCALE_WEBHOOKS_ALLOW_PRIVATE), sees its
// secret once, watches a finished job's delivery appear in the log with HTTP 200, redelivers it and rotates the
// secret; every message is checked at the receiver with the standardwebhooks package. An analyst is refused.
import http from "node:http";
import type { AddressInfo } from "node:net";
import { mkdirSync, readFileSync } from "node:fs";
import path from "node:path";
import type { Browser } from "playwright-core";
import { Webhook } from "standardwebhooks";
import { afterAll, beforeAll, describe, expect, test } from "vitest";
import { baseUrl, launchChromium, ROOT, SCREENSHOTS, signedInContext, type SignedIn } from "./browser";

const ADMIN = "admin@tallow-creek.example";
const ANALYST = "analyst@tallow-creek.example";
// 95 × 90 cells of 30″ (tests/fixtures/README.md): a drainage job on it ends in seconds.
const DEM = path.join(ROOT, "tests/fixtures/cache/debian/elev.tif");
const DELIVERY_DEADLINE_MS = 120_000;

interface Received { id: string; headers: Record<string, string>; body: string }
const received: Received[] = [];
let receiver: http.Server;
let hookUrl = "";
let browser: Browser;

const signedInPage = (email: string) => signedInContext(browser, email, { clipboard: true });

async function until<T>(f: () => T | undefined, timeoutMs = DELIVERY_DEADLINE_MS): Promise<T> {
  const deadline = Date.now() + timeoutMs;
  for (;;) {
    const v = f();
    if (v !== undefined) return v;
    if (Date.now() > deadline) throw new Error("timed out waiting at the receiver");
    await new Promise((r) => setTimeout(r, 100));
  }
}

beforeAll(async () => {
  receiver = http.createServer((req, res) => {
    let body = "";
    req.on("data", (c) => (body += c));
    req.on("end", () => {
      received.push({ id: String(req.headers["webhook-id"]), headers: req.headers as Record<string, string>, body });
      res.writeHead(200, { "content-type": "text/plain" }).end("thanks");
    });
  });
  await new Promise<void>((r) => receiver.listen(0, "127.0.0.1", r));
  hookUrl = `http://127.0.0.1:${(receiver.address() as AddressInfo).port}/rillscale-hook`;
  mkdirSync(SCREENSHOTS, { recursive: true });
  browser = await launchChromium();
});

afterAll(async () => {
  await browser?.close();
  await new Promise<void>((r) => receiver.close(() => r()));
});

describe("console: an admin's webhook endpoint from registration to a rotated secret", () => {
  let admin: SignedIn;
  let firstSecret = "";
  let jobId = "";
  let firstDelivery: Received;

  beforeAll(async () => {
    admin = await signedInPage(ADMIN);
  });

  afterAll(async () => {
    await admin?.context.close();
  });

  test("registering shows a whsec_ secret once, with a warning; the list then shows the endpoint without it", async () => {
    const { page } = admin;
    await page.getByRole("navigation", { name: "Console" }).getByRole("link", { name: "Webhooks" }).click();
    const form = page.getByRole("form", { name: "Register an endpoint" });
    await expect.poll(async () => (await form.textContent()) ?? "").toContain("RILLSCALE_WEBHOOKS_ALLOW_PRIVATE"); // derived: the page says loopback targets are allowed by this setting (STANDARDS.md)
    await form.getByLabel("URL").fill(hookUrl);
    await form.getByRole("button", { name: "Register endpoint" }).click();

    const shown = page.getByRole("dialog", { name: "Endpoint registered" });
    firstSecret = await shown.getByLabel("Secret").inputValue();
    expect(firstSecret).toMatch(/^whsec_/); // Standard Webhooks 1.0 secret prefix (STANDARDS.md)
    expect(await shown.getByRole("status").textContent()).toContain("shown only once"); // derived: our page's warning
    await shown.getByRole("button", { name: "Copy secret" }).click();
    expect(await page.evaluate(() => navigator.clipboard.readText())).toBe(firstSecret); // derived: the copy button copies the secret
    await shown.getByRole("button", { name: "I have stored it" }).click();

    const row = page.getByRole("table", { name: "Webhook endpoints" }).getByRole("row", { name: new RegExp(hookUrl.replace(/[.:/]/g, "\\$&")) });
    await row.waitFor();
    const text = (await row.textContent()) ?? "";
    for (const e of ["job.succeeded", "job.failed", "job.cancelled", "Enabled"]) expect(text).toContain(e); // derived: the default events of a new endpoint
    await page.reload();
    await row.waitFor();
    expect(await page.content()).not.toContain(firstSecret); // derived: the secret is shown once only
  });

  test("a finished job's delivery reaches the receiver, verifies, and shows in the log with HTTP 200", async () => {
    const { page } = admin;
    const upload = await page.request.post(`${baseUrl()}/api/v1/datasets?filename=elev.tif`, {
      headers: { "content-type": "image/tiff" }, data: readFileSync(DEM),
    });
    expect([200, 201]).toContain(upload.status()); // RFC 9110 §15.3.1/§15.3.2: stored anew or already there
    const dataset = ((await upload.json()) as { id: string }).id;
    // A threshold no other suite uses, so the job runs rather than reusing a cached result.
    const submitted = await page.request.post(`${baseUrl()}/api/v1/jobs`, {
      data: { dataset, kind: "drainage", params: { channelThreshold: { method: "area", km2: 7.5 } } },
    });
    expect(submitted.status()).toBe(202); // RFC 9110 §15.3.3: the job runs asynchronously
    jobId = ((await submitted.json()) as { id: string }).id;

    firstDelivery = await until(() => received.find((r) => (JSON.parse(r.body) as { data: { id: string } }).data.id === jobId));
    // Standard Webhooks 1.0, checked by its npm package (an independent implementation).
    const payload = new Webhook(firstSecret).verify(firstDelivery.body, firstDelivery.headers) as { type: string };
    expect(payload.type).toBe("job.succeeded"); // Standard Webhooks 1.0 payload type (thin payload, STANDARDS.md)

    await page.getByRole("button", { name: `Deliveries to ${hookUrl}` }).click();
    const row = page.locator(`tr[data-delivery-id="${firstDelivery.id}"]`);
    await expect.poll(async () => (await row.locator('[data-cell="result"]').textContent({ timeout: 10_000 })) ?? "", { timeout: 20_000 })
      .toContain("HTTP 200"); // Standard Webhooks 1.0: a 2xx answer is a success
    expect(await row.locator('[data-cell="job"]').textContent()).toBe(jobId.slice(0, 8)); // derived: the log names the job
    expect(await row.locator('[data-cell="event"]').textContent()).toBe("job.succeeded"); // derived: and the event
    await row.getByRole("button", { name: "Attempts" }).click();
    const attempts = page.getByRole("table", { name: `Attempts of ${firstDelivery.id}` });
    await attempts.waitFor();
    const attempt = (await attempts.locator("tbody tr").first().textContent()) ?? "";
    expect(attempt).toContain("HTTP 200"); // derived: the status the receiver answered
    expect(attempt).toMatch(/\d+ ms/); // derived: the attempt's duration
    expect(attempt).toContain("thanks"); // derived: the receiver's body as it answered
    await page.screenshot({ path: path.join(SCREENSHOTS, "webhooks-delivery-log.png"), fullPage: true });
  });

  test("Redeliver sends the same message again under a new webhook-id, and the log shows it delivered", async () => {
    const { page } = admin;
    const before = received.length;
    await page.locator(`tr[data-delivery-id="${firstDelivery.id}"]`).getByRole("button", { name: "Redeliver" }).click();
    const again = await until(() => received.slice(before).find((r) => r.body === firstDelivery.body));
    expect(again.id).not.toBe(firstDelivery.id); // derived: a manual redelivery is a new message (Standard Webhooks 1.0 keeps webhook-id only across retries)
    new Webhook(firstSecret).verify(again.body, again.headers); // Standard Webhooks 1.0 (standardwebhooks package): throws unless signed
    const row = page.locator(`tr[data-delivery-id="${again.id}"]`);
    await expect.poll(async () => (await row.locator('[data-cell="result"]').textContent({ timeout: 10_000 })) ?? "", { timeout: 20_000 })
      .toContain("HTTP 200"); // Standard Webhooks 1.0: a 2xx answer is a success
  });

  test("rotating shows a new secret once; during the overlap a delivery is signed with both secrets", async () => {
    const { page } = admin;
    await page.getByRole("button", { name: `Rotate the secret of ${hookUrl}` }).click();
    const confirm = page.getByRole("dialog", { name: "Rotate the signing secret?" });
    expect(await confirm.textContent()).toContain("both signatures are sent"); // derived: our page explains the overlap
    await confirm.getByRole("button", { name: "Rotate secret" }).click();
    const shown = page.getByRole("dialog", { name: "New signing secret" });
    const secondSecret = await shown.getByLabel("Secret").inputValue();
    expect(secondSecret).toMatch(/^whsec_/); // Standard Webhooks 1.0 secret prefix (STANDARDS.md)
    expect(secondSecret).not.toBe(firstSecret); // derived
    expect(await shown.textContent()).toContain("two signatures"); // derived: our page explains the overlap
    await page.screenshot({ path: path.join(SCREENSHOTS, "webhooks-rotated-secret.png") });
    await shown.getByRole("button", { name: "I have stored it" }).click();

    const before = received.length;
    await page.locator(`tr[data-delivery-id="${firstDelivery.id}"]`).getByRole("button", { name: "Redeliver" }).click();
    const signed = await until(() => received.slice(before).find((r) => r.body === firstDelivery.body));
    // Two space-separated v1 signatures; a receiver with either secret accepts the message (Standard Webhooks 1.0).
    expect(signed.headers["webhook-signature"].split(" ")).toHaveLength(2); // Standard Webhooks 1.0: webhook-signature is a space-delimited list
    new Webhook(secondSecret).verify(signed.body, signed.headers); // Standard Webhooks 1.0 (standardwebhooks package)
    new Webhook(firstSecret).verify(signed.body, signed.headers); // Standard Webhooks 1.0 (standardwebhooks package)
  });

  test("disable and enable switch the endpoint's status; delete removes it", async () => {
    const { page } = admin;
    const table = page.getByRole("table", { name: "Webhook endpoints" });
    await page.getByRole("button", { name: `Disable ${hookUrl}` }).click();
    await table.getByText("disabled by an admin").waitFor();
    await page.getByRole("button", { name: `Enable ${hookUrl}` }).click();
    await table.getByText("Enabled").waitFor();
    await page.getByRole("button", { name: `Delete ${hookUrl}` }).click();
    await page.getByRole("dialog", { name: "Delete this endpoint?" }).getByRole("button", { name: "Delete endpoint" }).click();
    await table.getByText("No endpoints yet.").waitFor();
    const list = await page.request.get(`${baseUrl()}/api/v1/webhooks`);
    expect(((await list.json()) as { items: { url: string }[] }).items.some((e) => e.url === hookUrl)).toBe(false); // derived: deleted means gone
  });
});

describe("console: webhooks are for admins only", () => {
  test("an analyst has no Webhooks link, the page says admins only, and the API answers 403", async () => {
    const analyst = await signedInPage(ANALYST);
    try {
      const { page } = analyst;
      const nav = page.getByRole("navigation", { name: "Console" });
      expect(await nav.getByRole("link", { name: "Webhooks" }).count()).toBe(0); // derived: admins only (our role design)
      await page.goto(`${baseUrl()}/webhooks`);
      await page.getByText("Webhooks are for org admins only").waitFor();
      expect(await page.getByRole("form", { name: "Register an endpoint" }).count()).toBe(0); // derived
      expect((await page.request.get(`${baseUrl()}/api/v1/webhooks`)).status()).toBe(403); // RFC 9110 §15.5.4 (403 Forbidden)
      await page.screenshot({ path: path.join(SCREENSHOTS, "webhooks-analyst-refused.png") });
    } finally {
      await analyst.context.close();
    }
  });
});
