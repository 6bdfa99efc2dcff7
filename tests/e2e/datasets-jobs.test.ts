// The product's main path in a real browser against the started server, worker and test database: an analyst
// uploads a DEM on the datasets page, starts a drainage analysis, watches it progress to done in the jobs table
// without reloading, opens the result and downloads an artifact; both are checked against the API itself.
import { existsSync, mkdirSync, readFileSync } from "node:fs";
import path from "node:path";
import { type Browser, type BrowserContext, type Page } from "playwright-core";
import { afterAll, beforeAll, describe, expect, test } from "vitest";
import { formatNumber } from "@/components/jobs/numbers";
import { baseUrl, launchChromium, ROOT, SCREENSHOTS, signIn } from "./browser";

// 403 × 344 Int16 DEM, 3″ cells, EPSG:4326 (tests/fixtures/README.md).
const DEM = path.join(ROOT, "tests/fixtures/cache/debian/jacksboro.tif");
const ANALYST = "analyst@tallow-creek.example";
const AUDITOR = "auditor@tallow-creek.example";
/** A drainage job on this DEM takes a few seconds; the wait allows for a busy machine. */
const JOB_DEADLINE_MS = 120_000;

let browser: Browser;

async function signedInPage(email: string): Promise<{ context: BrowserContext; page: Page }> {
  const context = await browser.newContext({ viewport: { width: 1360, height: 900 }, acceptDownloads: true });
  const page = await context.newPage();
  await signIn(page, email);
  await page.getByRole("navigation", { name: "Console" }).waitFor();
  return { context, page };
}

beforeAll(async () => {
  if (!existsSync(DEM)) throw new Error(`${DEM} is missing: run \`bash tests/fixtures/fetch.sh\``);
  mkdirSync(SCREENSHOTS, { recursive: true });
  browser = await launchChromium();
});

afterAll(async () => {
  await browser?.close();
});

describe("console: upload a DEM, run a drainage analysis, read and download its result", () => {
  let analyst: { context: BrowserContext; page: Page };
  let datasetId = "";
  let jobId = "";

  beforeAll(async () => {
    analyst = await signedInPage(ANALYST);
  });

  afterAll(async () => {
    await analyst?.context.close();
  });

  test("the analyst uploads the DEM on the datasets page and its row shows the metadata the API reports", async () => {
    const { page } = analyst;
    await page.getByRole("navigation", { name: "Console" }).getByRole("link", { name: "Datasets" }).click();
    const form = page.getByRole("form", { name: "Upload a dataset" });
    await form.getByLabel("File").setInputFiles(DEM);
    // Sending slowed to 64 KiB/s (Chrome DevTools Protocol network emulation), about 3 s for the 188 kB file,
    // so the bar is seen on its way from empty to full.
    const cdp = await analyst.context.newCDPSession(page);
    const throttle = (uploadThroughput: number) =>
      cdp.send("Network.emulateNetworkConditions", { offline: false, latency: 0, downloadThroughput: -1, uploadThroughput });
    await cdp.send("Network.enable");
    const bar = page.getByRole("progressbar", { name: "Upload progress" });
    const done = form.getByText("Uploaded “jacksboro.tif”");
    const percents: number[] = [];
    try {
      await throttle(64 * 1024);
      await form.getByRole("button", { name: "Upload" }).click();
      for (const deadline = Date.now() + 60_000; !(await done.isVisible()) && Date.now() < deadline; ) {
        const now = await bar.getAttribute("aria-valuenow", { timeout: 200 }).catch(() => null);
        if (now !== null && percents.at(-1) !== Number(now)) percents.push(Number(now));
        await page.waitForTimeout(50);
      }
    } finally {
      await throttle(-1);
    }
    await done.waitFor();
    expect(percents.some((p) => p > 0 && p < 100), `upload progress seen: ${percents.join(", ")}`).toBe(true);
    expect(percents).toEqual([...percents].sort((a, b) => a - b)); // derived: bytes sent only grow

    const list = await page.request.get(`${baseUrl()}/api/v1/datasets`);
    expect(list.status()).toBe(200);
    const items = ((await list.json()) as { items: { id: string; name: string; sizeBytes: number; metadata: { width: number; height: number } }[] }).items;
    const dataset = items.find((d) => d.name === "jacksboro.tif");
    expect(dataset).toBeDefined();
    datasetId = dataset!.id;
    // Derived: the stored size is the file's, and the grid is the fixture's 403 × 344 (tests/fixtures/README.md).
    expect(dataset!.sizeBytes).toBe(readFileSync(DEM).length);
    expect([dataset!.metadata.width, dataset!.metadata.height]).toEqual([403, 344]);
    const row = page.getByRole("table", { name: "Datasets" }).getByRole("row", { name: /jacksboro\.tif/ });
    await expect.poll(async () => (await row.textContent()) ?? "").toContain("403 × 344 cells");
    expect(await row.textContent()).toContain("EPSG:4326");
  });

  test("a drainage job started from the jobs page progresses to succeeded in the table without a reload", async () => {
    const { page } = analyst;
    await page.getByRole("navigation", { name: "Console" }).getByRole("link", { name: "Jobs" }).click();
    await page.getByRole("button", { name: "New analysis" }).click();
    const form = page.getByRole("form", { name: "New analysis" });
    await form.getByLabel("Kind").selectOption("drainage");
    await form.getByLabel("Dataset").selectOption(datasetId);
    // The parameters start at the pipeline's defaults (read on the server from its schema).
    expect(JSON.parse(await form.getByLabel("channelThreshold").inputValue())).toEqual({ method: "area", km2: 1 });

    let navigations = 0;
    page.on("framenavigated", (frame) => {
      if (frame === page.mainFrame()) navigations++;
    });
    await form.getByRole("button", { name: "Start analysis" }).click();
    const opened = page.getByRole("link", { name: "Open the job" });
    jobId = (await opened.getAttribute("data-job-id")) ?? "";
    expect(jobId).toMatch(/^[0-9a-f-]{36}$/);

    const status = page.locator(`tr[data-job-id="${jobId}"] [data-cell="status"]`);
    const seen: string[] = [];
    const deadline = Date.now() + JOB_DEADLINE_MS;
    for (;;) {
      const text = ((await status.textContent({ timeout: 10_000 })) ?? "").trim();
      if (seen.at(-1) !== text) seen.push(text);
      if (/succeeded|failed|cancelled/.test(text) || Date.now() > deadline) break;
      await page.waitForTimeout(100);
    }
    expect(seen.at(-1)).toBe("succeeded");
    // The table showed the job before it was done, and changed by itself: no navigation happened.
    expect(seen.some((s) => s.startsWith("queued") || s.startsWith("running"))).toBe(true);
    expect(navigations).toBe(0);
    const progress = page.getByRole("progressbar", { name: `Progress of job ${jobId.slice(0, 8)}` });
    expect(await progress.getAttribute("aria-valuenow")).toBe("100");
  });

  test("the job page shows the R_B that /result reports, and a download has the bytes of /artifacts/{name}", async () => {
    const { page } = analyst;
    await page.getByRole("link", { name: `Drainage job ${jobId.slice(0, 8)}` }).click();
    await page.getByRole("table", { name: "Horton ratios" }).waitFor();

    const result = await page.request.get(`${baseUrl()}/api/v1/jobs/${jobId}/result`);
    expect(result.status()).toBe(200);
    const summary = ((await result.json()) as { summary: { horton: { bifurcationRatio: { value: number } | null; table: unknown[] } } }).summary;
    expect(summary.horton.bifurcationRatio).not.toBeNull();
    const shown = (await page.locator('[data-ratio="bifurcation"]').textContent())?.trim();
    expect(shown).toBe(formatNumber(summary.horton.bifurcationRatio!.value, 4));
    // One table row per Strahler order in the summary.
    expect(await page.getByRole("table", { name: "Per-order table" }).locator("tbody tr").count()).toBe(summary.horton.table.length);

    const [download] = await Promise.all([
      page.waitForEvent("download"),
      page.getByRole("link", { name: "Download streams.geojson" }).click(),
    ]);
    expect(download.suggestedFilename()).toBe("streams.geojson");
    const downloaded = readFileSync(await download.path());
    const direct = await page.request.get(`${baseUrl()}/api/v1/jobs/${jobId}/artifacts/streams.geojson`);
    expect(direct.status()).toBe(200);
    expect(Buffer.compare(downloaded, await direct.body())).toBe(0);
    expect((JSON.parse(downloaded.toString("utf8")) as { type: string }).type).toBe("FeatureCollection");

    await page.screenshot({ path: path.join(SCREENSHOTS, "job-drainage.png"), fullPage: true });
  });

  test("a surface job's page lists each estimator's D as /result does and draws its log–log fits", async () => {
    const { page } = analyst;
    const submitted = await page.request.post(`${baseUrl()}/api/v1/jobs`, {
      data: { dataset: datasetId, kind: "surface", params: { estimators: ["variogram", "cube-counting", "power-spectrum", "triangular-prism"] } },
    });
    expect(submitted.status()).toBe(202);
    const surfaceId = ((await submitted.json()) as { id: string }).id;
    await page.goto(`${baseUrl()}/jobs/${surfaceId}`);
    await page.getByTestId("job-status").getByText("succeeded").waitFor({ timeout: JOB_DEADLINE_MS });
    await page.getByRole("table", { name: "Dimensions" }).waitFor();

    const result = await page.request.get(`${baseUrl()}/api/v1/jobs/${surfaceId}/result`);
    const rows = ((await result.json()) as { summary: { dimensions: { estimator: string; D: number }[] } }).summary.dimensions;
    expect(rows.length).toBeGreaterThan(0);
    const table = page.getByRole("table", { name: "Dimensions" });
    for (const r of rows) {
      const row = table.locator("tbody tr", { has: page.getByRole("cell", { name: r.estimator, exact: true }) });
      expect((await row.textContent()) ?? "").toContain(formatNumber(r.D, 4));
    }
    // One plot per estimator with a fit: variogram, cube counting, power spectrum, triangular prism.
    expect(await page.getByRole("img", { name: /points, \d+ used by the fit/ }).count()).toBe(4);
    await page.screenshot({ path: path.join(SCREENSHOTS, "job-surface.png"), fullPage: true });
    await page.goto(`${baseUrl()}/jobs`);
    await page.getByRole("table", { name: "Jobs" }).waitFor();
    await page.screenshot({ path: path.join(SCREENSHOTS, "jobs.png"), fullPage: true });
  });

  test("the status and kind filters narrow the jobs table to the matching jobs, as the API's own filters do (derived: one query)", async () => {
    const { page } = analyst;
    await page.goto(`${baseUrl()}/jobs`);
    const table = page.getByRole("table", { name: "Jobs" });
    const shownIds = async () => table.locator("tr[data-job-id]").evaluateAll((rows) => rows.map((r) => r.getAttribute("data-job-id")));
    // the table's first page holds 50 jobs
    const apiIds = async (query: string) =>
      ((await (await page.request.get(`${baseUrl()}/api/v1/jobs?limit=50&${query}`)).json()) as { items: { id: string }[] }).items.map((j) => j.id);
    // jobs of the other suites in this organisation may still change, so both sides are read afresh each time
    const sameAsApi = (query: string) =>
      expect.poll(async () => {
        const [shown, listed] = await Promise.all([shownIds(), apiIds(query)]);
        return JSON.stringify(shown) === JSON.stringify(listed);
      }, { timeout: 20_000, interval: 500 }).toBe(true);
    await page.getByLabel("Kind", { exact: true }).selectOption("surface");
    await sameAsApi("kind=surface");
    expect((await shownIds()).length).toBeGreaterThan(0); // the surface job of the test before
    await page.getByLabel("Status", { exact: true }).selectOption("succeeded");
    await page.getByLabel("Kind", { exact: true }).selectOption("drainage");
    await sameAsApi("status=succeeded&kind=drainage");
    expect(await shownIds()).toContain(jobId);
    await page.getByLabel("Status", { exact: true }).selectOption("cancelled");
    await sameAsApi("status=cancelled&kind=drainage");
    if ((await apiIds("status=cancelled&kind=drainage")).length === 0) await table.getByText("No job matches these filters.").waitFor();
  });

  test("a parameter out of bounds is named at its field, and a failed job's page shows why it failed", async () => {
    const { page } = analyst;
    await page.goto(`${baseUrl()}/jobs?dataset=${datasetId}`);
    const form = page.getByRole("form", { name: "New analysis" });
    await form.getByLabel("Dataset").selectOption(datasetId);
    // drainageParamsSchema: confidence lies in (0.5, 1); the API's 422 points at /params/confidence.
    await form.getByLabel("confidence").fill("2");
    await form.getByRole("button", { name: "Start analysis" }).click();
    await expect.poll(() => form.getByLabel("confidence").getAttribute("aria-invalid")).toBe("true");
    expect(await form.getByLabel("channelThreshold").getAttribute("aria-invalid")).toBe("false");

    // Derived: the DEM covers about 930 km², so no cell drains 100000 km² and the pipeline refuses.
    await form.getByLabel("confidence").fill("0.95");
    await form.getByLabel("channelThreshold").fill('{"method": "area", "km2": 100000}');
    await form.getByRole("button", { name: "Start analysis" }).click();
    await page.getByRole("link", { name: "Open the job" }).click();
    const why = page.getByRole("region", { name: "Why the job failed" });
    await why.waitFor({ timeout: JOB_DEADLINE_MS });
    expect(await why.textContent()).toContain("lower the channel threshold");
    await page.screenshot({ path: path.join(SCREENSHOTS, "job-failed.png"), fullPage: true });
  });

  test("while a job reads the dataset its delete is refused (409, said in the dialog); the job's cancel button stops it", async () => {
    const { page } = analyst;
    // A local dimension map at every cell: minutes of work on this DEM, so the job is still running when cancelled.
    const submitted = await page.request.post(`${baseUrl()}/api/v1/jobs`, {
      data: { dataset: datasetId, kind: "surface", params: { estimators: ["local-dimension"], localStepCells: 1 } },
    });
    expect(submitted.status()).toBe(202);
    const slowId = ((await submitted.json()) as { id: string }).id;
    await page.goto(`${baseUrl()}/datasets`);
    await page.getByRole("button", { name: "Delete jacksboro.tif" }).click();
    const confirm = page.getByRole("dialog", { name: "Delete “jacksboro.tif”?" });
    await confirm.getByRole("button", { name: "Delete dataset" }).click();
    await confirm.getByRole("alert").getByText("Still in use.").waitFor();
    await confirm.getByRole("button", { name: "Cancel" }).click();

    await page.goto(`${baseUrl()}/jobs/${slowId}`);
    await page.getByTestId("job-status").getByText(/^running/).waitFor({ timeout: JOB_DEADLINE_MS });
    await page.getByRole("button", { name: "Cancel job" }).click();
    await page.getByTestId("job-status").getByText("cancelled", { exact: true }).waitFor({ timeout: JOB_DEADLINE_MS });
    expect(await page.getByRole("button", { name: /Cancel job|Cancelling/ }).count()).toBe(0);
    const job = (await (await page.request.get(`${baseUrl()}/api/v1/jobs/${slowId}`)).json()) as { status: string };
    expect(job.status).toBe("cancelled");
  });

  test("deleting the dataset asks first, then removes its row; the finished job keeps its result", async () => {
    const { page } = analyst;
    await page.getByRole("navigation", { name: "Console" }).getByRole("link", { name: "Datasets" }).click();
    await page.getByRole("table", { name: "Datasets" }).waitFor();
    await page.screenshot({ path: path.join(SCREENSHOTS, "datasets.png"), fullPage: true });
    await page.getByRole("button", { name: "Delete jacksboro.tif" }).click();
    const confirm = page.getByRole("dialog", { name: "Delete “jacksboro.tif”?" });
    await confirm.getByRole("button", { name: "Delete dataset" }).click();
    await confirm.waitFor({ state: "hidden" });
    await page.getByRole("table", { name: "Datasets" }).getByRole("row", { name: /jacksboro\.tif/ }).waitFor({ state: "detached" });
    expect((await page.request.get(`${baseUrl()}/api/v1/datasets/${datasetId}`)).status()).toBe(404);
    expect((await page.request.get(`${baseUrl()}/api/v1/jobs/${jobId}/result`)).status()).toBe(200);
  });
});

describe("console: the auditor reads jobs but cannot upload or start them", () => {
  let auditor: { context: BrowserContext; page: Page };

  beforeAll(async () => {
    auditor = await signedInPage(AUDITOR);
  });

  afterAll(async () => {
    await auditor?.context.close();
  });

  test("the datasets page has no upload form and the jobs page no new-analysis button", async () => {
    const { page } = auditor;
    await page.getByRole("navigation", { name: "Console" }).getByRole("link", { name: "Datasets" }).click();
    await page.getByText("can read datasets but not upload or delete them").waitFor();
    expect(await page.getByRole("form", { name: "Upload a dataset" }).count()).toBe(0);
    await page.getByRole("navigation", { name: "Console" }).getByRole("link", { name: "Jobs" }).click();
    await page.getByRole("table", { name: "Jobs" }).waitFor();
    expect(await page.getByRole("button", { name: "New analysis" }).count()).toBe(0);
  });
});
