// Shared by the provenance, reproducibility, STAC and webhook suites: a drainage job on the small Luxembourg DEM
// (tests/fixtures/README.md), run once per parameter set, and polling for the worker's follow-up.
import { api } from "@/tests/integration/client";
import { fixture, submitOk, uploadOk, waitForJob, type JobBody } from "@/tests/integration/data-helpers";

/** 95 × 90 cells of 30″ (about 2 600 km²): a 5 km² initiation area gives a few Strahler orders in seconds. */
export const DEM = "debian/elev.tif";
export const params = (km2: number) => ({ channelThreshold: { method: "area", km2 } });

export async function finishedJob(key: string, km2 = 5): Promise<{ job: JobBody; datasetId: string; datasetSha256: string }> {
  const dem = fixture(DEM);
  const ds = await uploadOk(key, dem.bytes, "image/tiff", "?filename=elev.tif");
  const queued = await submitOk(key, { dataset: ds.id, kind: "drainage", params: params(km2) });
  const job = await waitForJob(key, queued.id, (j) => j.status !== "queued" && j.status !== "running");
  if (job.status !== "succeeded") throw new Error(`the drainage job ended ${job.status}: ${JSON.stringify(job.error)}`);
  return { job, datasetId: ds.id, datasetSha256: ds.sha256 };
}

/** GETs `path` until it answers 200 (the worker signs within a poll or two of the job's end). */
export async function eventually(path: string, auth: { key?: string; cookie?: string }, timeoutMs = 15_000): Promise<Response> {
  const deadline = Date.now() + timeoutMs;
  for (;;) {
    const res = await api(path, auth);
    if (res.status === 200 || Date.now() > deadline) return res;
    await new Promise((r) => setTimeout(r, 150));
  }
}
