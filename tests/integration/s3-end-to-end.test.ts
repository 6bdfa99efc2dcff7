// The upload → job → artifact path over HTTP with storage switched to S3: a fake S3 server (s3rver) on loopback,
// and a server + worker of this suite's own (tests/setup/stack.ts startExtraStack) with RILLSCALE_STORAGE=s3 on a
// database of their own, beside the shared local-disk stack. The bucket is read back through the AWS SDK.
import { GetObjectCommand, HeadObjectCommand, ListObjectsV2Command, S3Client } from "@aws-sdk/client-s3";
import { existsSync, mkdtempSync, readFileSync, readdirSync, rmSync } from "node:fs";
import { mkdtemp } from "node:fs/promises";
import { tmpdir } from "node:os";
import path from "node:path";
import S3rver from "s3rver";
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { runDrainage } from "@/lib/pipelines/drainage";
import { artifactKey, contentKey } from "@/lib/storage/keys";
import { fbmDem, fixture, sha256 } from "@/tests/integration/data-helpers";
import { startExtraStack, type ExtraStack } from "@/tests/setup/stack";

const BUCKET = "rillscale-e2e";
/** S3's smallest part (5 MiB) so a DEM of a few tens of MiB goes up in several parts. */
const PART_SIZE_MIB = 5;
/** s3rver accepts any signature; these only need to be present. */
const S3_CREDENTIALS = { accessKeyId: "S3RVER", secretAccessKey: "S3RVER" };
const PARAMS = { channelThreshold: { method: "area", km2: 2 } } as const;
/** JSON as the API stores and sends it: NaN and ±Infinity become null. */
const asJson = (v: unknown) => JSON.parse(JSON.stringify(v)) as unknown;

interface S3Request { method: string; path: string; query: string; range?: string }
type KoaContext = { method: string; path: string; querystring: string; headers: Record<string, string | undefined> };

let fake: S3rver;
let s3: S3Client;
let app: ExtraStack;
const requests: S3Request[] = [];
const tempDirs: string[] = [];
let localRoot = "";
let uploadTmp = "";

const tempDir = (label: string) => {
  const d = mkdtempSync(path.join(tmpdir(), `rillscale-s3e2e-${label}-`));
  tempDirs.push(d);
  return d;
};

async function call(p: string, init: { method?: string; body?: unknown; headers?: Record<string, string> } = {}): Promise<Response> {
  const headers: Record<string, string> = { authorization: `Bearer ${app.demoKeySecret}`, ...init.headers };
  let body: BodyInit | undefined;
  if (init.body instanceof Uint8Array) body = init.body as Uint8Array<ArrayBuffer>;
  else if (init.body !== undefined) {
    body = JSON.stringify(init.body);
    headers["content-type"] = "application/json";
  }
  return fetch(`${app.url}${p}`, { method: init.method ?? "GET", headers, body });
}

async function uploadDem(bytes: Uint8Array, filename: string): Promise<{ id: string; sha256: string; mediaType: string }> {
  const res = await call(`/api/v1/datasets?filename=${filename}`, { method: "POST", body: bytes, headers: { "content-type": "image/tiff" } });
  expect(res.status, await res.clone().text()).toBe(201);
  return (await res.json()) as { id: string; sha256: string; mediaType: string };
}

async function bucketObject(key: string): Promise<Buffer> {
  const res = await s3.send(new GetObjectCommand({ Bucket: BUCKET, Key: key }));
  return Buffer.from(await res.Body!.transformToByteArray());
}

async function bucketKeys(prefix: string): Promise<string[]> {
  const keys: string[] = [];
  let token: string | undefined;
  do {
    const res = await s3.send(new ListObjectsV2Command({ Bucket: BUCKET, Prefix: prefix, ContinuationToken: token }));
    for (const o of res.Contents ?? []) keys.push(o.Key!);
    token = res.IsTruncated ? res.NextContinuationToken : undefined;
  } while (token);
  return keys.sort();
}

/** Every file under dir (none when it does not exist). */
function filesUnder(dir: string): string[] {
  if (!existsSync(dir)) return [];
  return readdirSync(dir, { recursive: true, withFileTypes: true }).filter((e) => e.isFile()).map((e) => path.join(e.parentPath, e.name));
}

/** Requests of the product to the bucket for one key (path-style: /bucket/key). */
const requestsFor = (key: string) => requests.filter((r) => r.path === `/${BUCKET}/${key}`);

beforeAll(async () => {
  fake = new S3rver({ address: "127.0.0.1", port: 0, silent: true, directory: tempDir("bucket"), configureBuckets: [{ name: BUCKET }] });
  // s3rver is a Koa app composed when it starts listening: a first middleware sees every request it serves
  (fake as unknown as { middleware: ((ctx: KoaContext, next: () => Promise<void>) => Promise<void>)[] }).middleware.unshift(async (ctx, next) => {
    requests.push({ method: ctx.method, path: decodeURIComponent(ctx.path), query: ctx.querystring, range: ctx.headers.range });
    await next();
  });
  const { port } = await fake.run();
  const endpoint = `http://127.0.0.1:${port}`;
  s3 = new S3Client({
    region: "us-east-1", endpoint, forcePathStyle: true, credentials: S3_CREDENTIALS,
    requestChecksumCalculation: "WHEN_REQUIRED", responseChecksumValidation: "WHEN_REQUIRED",
  });
  localRoot = path.join(tempDir("local"), "objects");
  uploadTmp = path.join(tempDir("staging"), "uploads");
  app = await startExtraStack("s3", {
    RILLSCALE_STORAGE: "s3",
    RILLSCALE_S3_BUCKET: BUCKET,
    RILLSCALE_S3_ENDPOINT: endpoint,
    RILLSCALE_S3_REGION: "us-east-1",
    RILLSCALE_S3_FORCE_PATH_STYLE: "true",
    RILLSCALE_S3_ACCESS_KEY_ID: S3_CREDENTIALS.accessKeyId,
    RILLSCALE_S3_SECRET_ACCESS_KEY: S3_CREDENTIALS.secretAccessKey,
    RILLSCALE_S3_PART_SIZE_MIB: String(PART_SIZE_MIB),
    RILLSCALE_S3_CHECKSUMS: "when_required",
    // where a local store would write: it must stay empty
    RILLSCALE_STORAGE_ROOT: localRoot,
    RILLSCALE_UPLOAD_TMP: uploadTmp,
  });
});

afterAll(async () => {
  await app?.stop();
  s3?.destroy();
  await fake?.close();
  for (const d of tempDirs) rmSync(d, { recursive: true, force: true });
});

interface Artifact { name: string; mediaType: string; sizeBytes: number; sha256: string }

describe("upload → drainage job → artifacts with RILLSCALE_STORAGE=s3 (issue 6, S3 adapter end to end)", () => {
  const dem = () => fixture("debian/jacksboro.tif");
  let dataset = { id: "", sha256: "", mediaType: "" };
  let jobId = "";
  let artifacts: Artifact[] = [];
  const served: Record<string, Buffer> = {};

  beforeAll(async () => {
    dataset = await uploadDem(dem().bytes, "jacksboro.tif");
    const submitted = await call("/api/v1/jobs", { method: "POST", body: { dataset: dataset.id, kind: "drainage", params: PARAMS } });
    expect(submitted.status, await submitted.clone().text()).toBe(202);
    jobId = ((await submitted.json()) as { id: string }).id;
    const deadline = Date.now() + 120_000;
    let job: { status: string; error: unknown };
    do {
      await new Promise((r) => setTimeout(r, 250));
      job = (await (await call(`/api/v1/jobs/${jobId}`)).json()) as { status: string; error: unknown };
    } while (!["succeeded", "failed", "cancelled"].includes(job.status) && Date.now() < deadline);
    expect(job.status, JSON.stringify(job.error)).toBe("succeeded");
    artifacts = ((await (await call(`/api/v1/jobs/${jobId}/artifacts`)).json()) as { items: Artifact[] }).items;
    for (const a of artifacts) {
      const res = await call(`/api/v1/jobs/${jobId}/artifacts/${a.name}`);
      expect(res.status).toBe(200);
      expect(res.headers.get("content-type")).toBe(a.mediaType);
      expect(res.headers.get("content-length")).toBe(String(a.sizeBytes));
      served[a.name] = Buffer.from(await res.arrayBuffer());
    }
  });

  it("the dataset lives in the bucket under its SHA-256 content key, byte for byte (derived: content addressing)", async () => {
    expect(dataset.sha256).toBe(sha256(dem().bytes));
    const key = contentKey(dataset.sha256, "datasets");
    expect(await bucketKeys("datasets/")).toEqual([key]);
    expect(sha256(await bucketObject(key))).toBe(dataset.sha256);
    const head = await s3.send(new HeadObjectCommand({ Bucket: BUCKET, Key: key }));
    expect(dataset.mediaType).toMatch(/^image\/tiff/);
    expect(head.ContentType).toBe(dataset.mediaType); // derived: the upload's media type is recorded with the object
    expect(head.ContentLength).toBe(dem().bytes.length);
  });

  it("every artifact lives in the bucket under jobs/<id>/<name>, and nothing else does (derived)", async () => {
    expect(artifacts.map((a) => a.name).sort()).toEqual(["basins.tif", "flow-accumulation.tif", "horton-orders.csv", "strahler-order.tif", "streams.geojson"]);
    expect(await bucketKeys("jobs/")).toEqual(artifacts.map((a) => artifactKey(jobId, a.name)).sort());
    for (const a of artifacts) {
      const head = await s3.send(new HeadObjectCommand({ Bucket: BUCKET, Key: artifactKey(jobId, a.name) }));
      expect(head.ContentType, a.name).toBe(a.mediaType);
      expect(head.ContentLength, a.name).toBe(a.sizeBytes);
    }
  });

  it("each download's bytes are the bucket's bytes and the listing's SHA-256, with the hash as ETag (derived)", async () => {
    for (const a of artifacts) {
      const stored = await bucketObject(artifactKey(jobId, a.name));
      expect(sha256(served[a.name]), a.name).toBe(sha256(stored));
      expect(sha256(served[a.name]), a.name).toBe(a.sha256);
      expect(served[a.name].length, a.name).toBe(a.sizeBytes);
    }
    const etagged = await call(`/api/v1/jobs/${jobId}/artifacts/basins.tif`);
    expect(etagged.headers.get("etag")).toBe(`"${artifacts.find((a) => a.name === "basins.tif")!.sha256}"`);
    await etagged.body?.cancel();
  });

  it("range requests answer 206 with the right bytes, read from S3 as ranges, and 416 past the end (RFC 9110 §14)", async () => {
    for (const a of artifacts) {
      const whole = served[a.name];
      const mid = Math.floor(whole.length / 2);
      const before = requestsFor(artifactKey(jobId, a.name)).length;
      const cases = [
        { header: `bytes=${mid}-${mid + 99}`, start: mid, end: mid + 99 },
        { header: "bytes=-64", start: whole.length - 64, end: whole.length - 1 },
        { header: `bytes=${whole.length - 10}-`, start: whole.length - 10, end: whole.length - 1 },
      ];
      for (const c of cases) {
        const res = await call(`/api/v1/jobs/${jobId}/artifacts/${a.name}`, { headers: { range: c.header } });
        expect(res.status, `${a.name} ${c.header}`).toBe(206);
        expect(res.headers.get("content-range")).toBe(`bytes ${c.start}-${c.end}/${whole.length}`);
        expect(res.headers.get("content-length")).toBe(String(c.end - c.start + 1));
        expect(Buffer.from(await res.arrayBuffer()).equals(whole.subarray(c.start, c.end + 1)), `${a.name} ${c.header}`).toBe(true);
      }
      // derived: the server asked S3 for each range, not for the whole object
      const ranged = requestsFor(artifactKey(jobId, a.name)).slice(before).filter((r) => r.method === "GET").map((r) => r.range);
      expect(ranged).toEqual(cases.map((c) => `bytes=${c.start}-${c.end}`));
      const past = await call(`/api/v1/jobs/${jobId}/artifacts/${a.name}`, { headers: { range: `bytes=${whole.length}-` } });
      expect(past.status).toBe(416);
      expect(past.headers.get("content-range")).toBe(`bytes */${whole.length}`);
    }
  });

  it("/result equals the library pipeline on the same file, and its artifacts are byte-identical (derived)", async () => {
    const lib = await runDrainage({ demPath: dem().path, outDir: await mkdtemp(path.join(tempDir("lib"), "out-")) }, PARAMS);
    const result = (await (await call(`/api/v1/jobs/${jobId}/result`)).json()) as { summary: unknown };
    expect(result.summary).toEqual(asJson(lib.summary));
    for (const a of lib.artifacts) {
      const bytes = a.bytes ?? readFileSync(a.path!);
      expect(sha256(served[a.name]), a.name).toBe(sha256(bytes));
    }
  });

  it("the local storage root got nothing and no staged upload is left behind (derived)", () => {
    expect(filesUnder(localRoot)).toEqual([]);
    expect(filesUnder(uploadTmp)).toEqual([]);
  });
});

describe("a DEM larger than one part goes to S3 as a multipart upload (issue 6: multipart uploads for large objects)", () => {
  let big = { id: "", key: "" };
  it("several UploadPart requests, one completion, and the object equals the uploaded bytes (derived; Amazon S3 multipart API)", async () => {
    const bytes = readFileSync(await fbmDem(2048));
    const parts = Math.ceil(bytes.length / (PART_SIZE_MIB * 1024 * 1024));
    expect(parts).toBeGreaterThanOrEqual(3);
    const uploaded = await uploadDem(bytes, "fbm-2048.tif");
    expect(uploaded.sha256).toBe(sha256(bytes));
    const key = contentKey(uploaded.sha256, "datasets");
    big = { id: uploaded.id, key };
    const sent = requestsFor(key);
    expect(sent.filter((r) => r.method === "POST" && /(^|&)uploads(=|&|$)/.test(r.query))).toHaveLength(1); // CreateMultipartUpload
    expect(sent.filter((r) => r.method === "PUT" && /partNumber=/.test(r.query))).toHaveLength(parts); // UploadPart
    expect(sent.filter((r) => r.method === "POST" && /uploadId=/.test(r.query))).toHaveLength(1); // CompleteMultipartUpload
    expect(sha256(await bucketObject(key))).toBe(uploaded.sha256);
    expect(filesUnder(localRoot)).toEqual([]);
  });

  it("deleting that dataset removes its object from the bucket (derived; issue 6 DELETE /datasets/{id})", async () => {
    expect((await bucketKeys("datasets/")).includes(big.key)).toBe(true);
    expect((await call(`/api/v1/datasets/${big.id}`, { method: "DELETE" })).status).toBe(204);
    expect((await bucketKeys("datasets/")).includes(big.key)).toBe(false);
  });
});

describe("a refused upload stores nothing in the bucket (issue 6: nothing half-stored)", () => {
  it("PNG bytes named .tif answer 422 and leave the bucket's datasets as they were (derived)", async () => {
    const before = await bucketKeys("");
    const res = await call("/api/v1/datasets?filename=png-named.tif", {
      method: "POST", body: fixture("hostile/png-named.tif").bytes, headers: { "content-type": "image/tiff" },
    });
    expect(res.status).toBe(422);
    expect(res.headers.get("content-type")).toMatch(/^application\/problem\+json/);
    expect(await bucketKeys("")).toEqual(before);
    expect(filesUnder(uploadTmp)).toEqual([]);
  });
});
