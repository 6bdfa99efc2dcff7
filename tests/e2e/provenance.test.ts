// Signed provenance in a real browser: an auditor downloads a finished job's PROV-JSON and detached JWS from the
// job page (checked byte for byte against the API), verifies them in the page (signature, key id, the hashes of
// the input and of every artifact re-hashed in the browser); an analyst has no provenance section; an admin
// rotates the signing key on the signing-keys page and the earlier document still verifies with the retired key.
import { mkdirSync, readFileSync } from "node:fs";
import path from "node:path";
import type { Browser } from "playwright-core";
import { afterAll, beforeAll, describe, expect, test } from "vitest";
import { baseUrl, launchChromium, ROOT, SCREENSHOTS, signedInContext, type SignedIn } from "./browser";

const ADMIN = "admin@tallow-creek.example";
const ANALYST = "analyst@tallow-creek.example";
const AUDITOR = "auditor@tallow-creek.example";
// 95 × 90 cells of 30″ (tests/fixtures/README.md): a drainage job on it ends in seconds.
const DEM = path.join(ROOT, "tests/fixtures/cache/debian/elev.tif");
const JOB_DEADLINE_MS = 120_000;

let browser: Browser;

const signedInPage = (email: string) => signedInContext(browser, email);

async function poll<T>(f: () => Promise<T | undefined>, timeoutMs = JOB_DEADLINE_MS): Promise<T> {
  const deadline = Date.now() + timeoutMs;
  for (;;) {
    const v = await f();
    if (v !== undefined) return v;
    if (Date.now() > deadline) throw new Error("timed out");
    await new Promise((r) => setTimeout(r, 200));
  }
}

const kidOf = (jws: string) => (JSON.parse(Buffer.from(jws.split(".")[0]!, "base64url").toString("utf8")) as { kid: string }).kid;

beforeAll(async () => {
  mkdirSync(SCREENSHOTS, { recursive: true });
  browser = await launchChromium();
});

afterAll(async () => {
  await browser?.close();
});

describe("console: a finished job's signed provenance", () => {
  let admin: SignedIn;
  let auditor: SignedIn;
  let jobId = "";
  let artifactNames: string[] = [];
  let firstKid = "";

  beforeAll(async () => {
    admin = await signedInPage(ADMIN);
    auditor = await signedInPage(AUDITOR);
    const request = admin.page.request;
    const upload = await request.post(`${baseUrl()}/api/v1/datasets?filename=elev.tif`, { headers: { "content-type": "image/tiff" }, data: readFileSync(DEM) });
    expect([200, 201]).toContain(upload.status()); // RFC 9110 §15.3.1/§15.3.2: stored anew or already there
    const dataset = ((await upload.json()) as { id: string }).id;
    const submitted = await request.post(`${baseUrl()}/api/v1/jobs`, {
      data: { dataset, kind: "drainage", params: { channelThreshold: { method: "area", km2: 6.5 } } },
    });
    expect(submitted.status()).toBe(202); // RFC 9110 §15.3.3: the job runs asynchronously
    jobId = ((await submitted.json()) as { id: string }).id;
    const status = await poll(async () => {
      const s = ((await (await request.get(`${baseUrl()}/api/v1/jobs/${jobId}`)).json()) as { status: string }).status;
      return s === "queued" || s === "running" ? undefined : s;
    });
    expect(status).toBe("succeeded"); // derived: the precondition of the suite
    // The worker signs within a poll or two of the job's end.
    await poll(async () => ((await request.get(`${baseUrl()}/api/v1/jobs/${jobId}/provenance.jws`)).status() === 200 ? true : undefined));
    const artifacts = (await (await request.get(`${baseUrl()}/api/v1/jobs/${jobId}/artifacts`)).json()) as { items: { name: string }[] };
    artifactNames = artifacts.items.map((a) => a.name);
    expect(artifactNames.length).toBeGreaterThan(0); // derived: there are artifacts to hash
  });

  afterAll(async () => {
    await admin?.context.close();
    await auditor?.context.close();
  });

  test("the auditor downloads the PROV-JSON and the JWS from the job page, byte for byte as the API serves them", async () => {
    const { page } = auditor;
    await page.goto(`${baseUrl()}/jobs/${jobId}`);
    const section = page.getByRole("region", { name: "Provenance" });
    await section.waitFor();

    const [doc] = await Promise.all([page.waitForEvent("download"), section.getByRole("link", { name: "Download PROV-JSON" }).click()]);
    expect(doc.suggestedFilename()).toBe(`provenance-${jobId}.json`); // derived: our download name
    const docBytes = readFileSync(await doc.path());
    const direct = await page.request.get(`${baseUrl()}/api/v1/jobs/${jobId}/provenance`);
    expect(Buffer.compare(docBytes, await direct.body())).toBe(0); // derived: the page serves the signed bytes unchanged (RFC 7797 signs them as they are)
    const prov = JSON.parse(docBytes.toString("utf8")) as { entity: object; activity: Record<string, unknown> };
    expect(Object.keys(prov.activity)).toEqual([`rill:job-${jobId}`]); // W3C PROV-JSON: activities keyed by qualified name; one per job (STANDARDS.md)

    const [sig] = await Promise.all([page.waitForEvent("download"), section.getByRole("link", { name: "Download signature (JWS)" }).click()]);
    const jws = readFileSync(await sig.path(), "utf8").trim();
    // RFC 7797 detached compact form: header..signature.
    expect(jws).toMatch(/^[A-Za-z0-9_-]+\.\.[A-Za-z0-9_-]+$/); // RFC 7515 §7.1 compact serialization with the payload detached (RFC 7515 Appendix F)
    firstKid = kidOf(jws);
  });

  test("Verify in the page reports a valid signature, the key id, and each artifact's browser-computed hash in the document", async () => {
    const { page } = auditor;
    const section = page.getByRole("region", { name: "Provenance" });
    await section.getByRole("button", { name: "Verify" }).click();
    const outcome = section.getByTestId("provenance-verification");
    await outcome.waitFor();
    expect(await outcome.getByRole("status").textContent()).toContain("Verified."); // RFC 7515 §5.2 validation, in the page
    expect(await outcome.getByTestId("signature-state").textContent()).toMatch(/^valid/); // RFC 7515 §5.2
    expect(await outcome.getByTestId("signing-kid").textContent()).toBe(firstKid); // RFC 7515 §4.1.4 kid of the protected header
    const jwks = (await (await page.request.get(`${baseUrl()}/.well-known/jwks.json`)).json()) as { keys: { kid: string }[] };
    expect(jwks.keys.map((k) => k.kid)).toContain(firstKid); // RFC 7517 §5 JWK Set; the kid finds the key (RFC 7515 §4.1.4)

    const rows = outcome.getByRole("table", { name: "Hashes checked" }).locator("tbody tr");
    // The input dataset and every artifact: each hash matches an entity of the signed document.
    expect(await rows.count()).toBe(artifactNames.length + 1); // derived: one row per artifact plus the input (STANDARDS.md entities)
    for (const name of [...artifactNames, "elev.tif"]) {
      expect(await rows.filter({ hasText: name }).locator('[data-cell="match"]').textContent()).toMatch(/^matches rill:/); // W3C PROV-JSON entity with its sha256 (STANDARDS.md); derived
    }
    expect(await outcome.getByRole("note", { name: "Caution" }).textContent()).toContain("Screening analysis"); // derived: our caution note
    await page.screenshot({ path: path.join(SCREENSHOTS, "job-provenance-verified.png"), fullPage: true });
  });

  test("an analyst, who lacks provenance:read, sees the job page without a provenance section", async () => {
    const analyst = await signedInPage(ANALYST);
    try {
      await analyst.page.goto(`${baseUrl()}/jobs/${jobId}`);
      await analyst.page.getByRole("table", { name: "Artifacts" }).waitFor();
      expect(await analyst.page.getByRole("region", { name: "Provenance" }).count()).toBe(0); // derived: provenance:read is needed (our role design)
      expect((await analyst.page.request.get(`${baseUrl()}/api/v1/jobs/${jobId}/provenance`)).status()).toBe(403); // RFC 9110 §15.5.4 (403 Forbidden)
    } finally {
      await analyst.context.close();
    }
  });

  test("the admin rotates the signing key; the list shows the old key retired, and the old document still verifies", async () => {
    const { page } = admin;
    await page.getByRole("navigation", { name: "Console" }).getByRole("link", { name: "Signing keys" }).click();
    const table = page.getByRole("table", { name: "Signing keys" });
    const oldRow = table.getByRole("row", { name: new RegExp(firstKid) });
    await expect.poll(async () => (await oldRow.textContent()) ?? "").toContain("Active"); // derived
    await page.getByRole("button", { name: "Rotate now" }).click();
    await page.getByRole("dialog", { name: "Rotate the signing key now?" }).getByRole("button", { name: "Rotate signing key" }).click();
    await page.getByText("now signs new documents").waitFor();
    await expect.poll(async () => (await oldRow.textContent()) ?? "").toContain("Retired"); // derived: a rotated key is kept, retired
    expect(await table.locator("tbody tr").filter({ hasText: "Active" }).count()).toBe(1); // derived: one signing key at a time
    await page.screenshot({ path: path.join(SCREENSHOTS, "signing-keys-rotated.png"), fullPage: true });

    const a = auditor.page;
    await a.reload();
    const section = a.getByRole("region", { name: "Provenance" });
    await section.getByRole("button", { name: "Verify" }).click();
    const outcome = section.getByTestId("provenance-verification");
    await outcome.waitFor();
    expect(await outcome.getByRole("status").textContent()).toContain("Verified."); // derived: a retired key still verifies what it signed (RFC 7515 §5.2)
    expect(await outcome.getByTestId("signing-kid").textContent()).toBe(firstKid); // RFC 7515 §4.1.4
  });

  test("an auditor is not shown the admin-only Signing keys page", async () => {
    const { page } = auditor;
    expect(await page.getByRole("navigation", { name: "Console" }).getByRole("link", { name: "Signing keys" }).count()).toBe(0); // derived: admins only (our role design)
    await page.goto(`${baseUrl()}/signing-keys`);
    await page.getByText("Signing keys are for org admins only").waitFor();
  });
});
