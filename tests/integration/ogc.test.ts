// The feature service (OGC API – Features Part 1) read by a client nobody here wrote: GDAL's OAPIF driver
// (`ogrinfo` from Debian's gdal-bin) against the started server, on the stream links of a drainage job run by
// the worker on a real DEM, with the key in a header. Counts are checked against the job's own streams.geojson.
import { execFile } from "node:child_process";
import { randomUUID } from "node:crypto";
import { promisify } from "node:util";
import { beforeAll, describe, expect, it } from "vitest";
import { ADMIN, OTHER_ADMIN, api, createKey, signIn, stack } from "@/tests/integration/client";
import { finished, fixture, submitOk, uploadOk, waitForJob } from "@/tests/integration/data-helpers";

const run = promisify(execFile);
/** Features per page the driver is told to ask for: well below the link count, so it must follow `next`. */
const PAGE_SIZE = 7;

interface Link {
  id: number;
  properties: { order: number };
  geometry: { coordinates: [number, number][] };
}

let key = "";
let otherKey = "";
let jobId = "";
let links: Link[] = [];
const ogc = () => `${stack().url}/api/v1/ogc`;

beforeAll(async () => {
  const admin = await signIn(ADMIN);
  key = (await createKey(admin, ["datasets:write", "jobs:write", "jobs:read", "results:read"], "ogc suite")).secret;
  otherKey = (await createKey(await signIn(OTHER_ADMIN), ["admin"], "ogc suite other org")).secret;
  const dataset = await uploadOk(key, fixture("debian/elev.tif").bytes, "image/tiff", "?filename=elev.tif");
  // a threshold of its own, so this job is computed by the worker rather than reused from another suite's
  const job = await submitOk(key, { dataset: dataset.id, kind: "drainage", params: { channelThreshold: { method: "area", km2: 15 } } });
  const done = await waitForJob(key, job.id, finished);
  expect(done.status, JSON.stringify(done.error)).toBe("succeeded");
  jobId = done.id;
  const artifact = await api(`/api/v1/jobs/${jobId}/artifacts/streams.geojson`, { key });
  expect(artifact.status).toBe(200);
  links = ((await artifact.json()) as { features: Link[] }).features;
  expect(links.length).toBeGreaterThan(3 * PAGE_SIZE);
});

/** ogrinfo with the key sent as a header through GDAL's GDAL_HTTP_HEADERS setting (GDAL ≥ 3.6), never the URL. */
async function ogrinfo(args: string[], apiKey = key) {
  const env = { ...process.env, GDAL_HTTP_HEADERS: `Authorization: Bearer ${apiKey}`, CPL_DEBUG: "ON", GDAL_HTTP_TIMEOUT: "30" };
  try {
    return await run("ogrinfo", ["-ro", "-oo", `PAGE_SIZE=${PAGE_SIZE}`, ...args], { env, timeout: 60_000, maxBuffer: 64 * 1024 * 1024 });
  } catch (e) {
    const err = e as { stdout?: string; stderr?: string; code?: number };
    return { stdout: err.stdout ?? "", stderr: `${err.stderr ?? ""}\n(exit ${err.code})` };
  }
}

const featureIdsOf = (stdout: string) => [...stdout.matchAll(/^OGRFeature\([^)]*\):(\d+)$/gm)].map((m) => Number(m[1]));
const itemRequestsOf = (stderr: string) => [...stderr.matchAll(/\/collections\/[^/\s]+\/items\?[^\s'"]*/g)].map((m) => m[0]);

/** Envelope of a link. */
const envelope = (l: Link) => {
  const xs = l.geometry.coordinates.map((c) => c[0]);
  const ys = l.geometry.coordinates.map((c) => c[1]);
  return { w: Math.min(...xs), s: Math.min(...ys), e: Math.max(...xs), n: Math.max(...ys) };
};

describe("GDAL's OGC API – Features driver reads the stream network of a finished job", () => {
  it("ogrinfo lists the job's collection as a line layer (GDAL OAPIF driver)", async () => {
    const { stdout, stderr } = await ogrinfo([`OAPIF:${ogc()}`]);
    expect(stdout, stderr).toMatch(new RegExp(`^\\d+: ${jobId} \\(title: Stream network of drainage job ${jobId}\\) \\(Line String\\)$`, "m"));
  });

  it("ogrinfo reads every link across next pages, and the count equals the job's streams.geojson (derived)", async () => {
    const { stdout, stderr } = await ogrinfo([`OAPIF:${ogc()}`, jobId]);
    const ids = featureIdsOf(stdout);
    expect(ids.length, stderr.slice(-2000)).toBe(links.length);
    expect(new Set(ids)).toEqual(new Set(links.map((l) => l.id)));
    const requests = itemRequestsOf(stderr);
    // one request per page of PAGE_SIZE, the later ones through our opaque cursor
    expect(requests.filter((r) => r.includes("cursor=")).length).toBeGreaterThanOrEqual(Math.ceil(links.length / PAGE_SIZE) - 1);
    expect(requests.every((r) => r.includes(`limit=${PAGE_SIZE}`))).toBe(true);
    // the attribute the driver reads for each link is the order in the artifact
    const orders = [...stdout.matchAll(/^\s+order \(Integer\) = (\d+)$/gm)].map((m) => Number(m[1]));
    expect(orders.reduce((a, b) => a + b, 0)).toBe(links.reduce((a, l) => a + l.properties.order, 0));
  });

  it("ogrinfo -spat sends the bbox to the server and gets the links that intersect it (derived bounds from the artifact)", async () => {
    const all = links.map(envelope);
    const w = Math.min(...all.map((b) => b.w)), e = Math.max(...all.map((b) => b.e));
    const s = Math.min(...all.map((b) => b.s)), n = Math.max(...all.map((b) => b.n));
    const box = { w, s, e: w + (e - w) / 2, n: s + (n - s) / 2 }; // the south-west quarter of the network
    const { stdout, stderr } = await ogrinfo(["-spat", String(box.w), String(box.s), String(box.e), String(box.n), `OAPIF:${ogc()}`, jobId]);
    const got = featureIdsOf(stdout).length;
    // the driver's first request (reading the layer's fields) has no filter; the pages it reads carry the bbox
    const requests = itemRequestsOf(stderr);
    expect(requests.filter((r) => r.includes("bbox=")).length, requests.join("\n")).toBeGreaterThan(0);
    expect(requests.filter((r) => r.includes("cursor=")).every((r) => r.includes("bbox="))).toBe(true);
    const inside = all.filter((b) => b.w >= box.w && b.e <= box.e && b.s >= box.s && b.n <= box.n).length;
    const touching = all.filter((b) => b.w <= box.e && b.e >= box.w && b.s <= box.n && b.n >= box.s).length;
    expect(got, stderr.slice(-2000)).toBeGreaterThanOrEqual(inside);
    expect(got).toBeLessThanOrEqual(touching);
    expect(got).toBeGreaterThan(0);
    expect(got).toBeLessThan(links.length);
    const page = (await (await api(`/api/v1/ogc/collections/${jobId}/items?limit=10000&bbox=${box.w},${box.s},${box.e},${box.n}`, { key })).json()) as { numberMatched: number };
    expect(page.numberMatched).toBe(got);
  });
});

describe("the feature service over HTTP", () => {
  it("the landing page links self, service-desc, conformance and data, and /conformance lists core, geojson and oas30 (OGC 17-069r4 §7.2–7.4)", async () => {
    const landing = await api("/api/v1/ogc", { key });
    expect(landing.status).toBe(200);
    const { links: rels } = (await landing.json()) as { links: { rel: string; href: string }[] };
    expect(Object.fromEntries(rels.map((l) => [l.rel, l.href]))).toEqual({
      self: ogc(), "service-desc": `${stack().url}/api/v1/openapi.json`, conformance: `${ogc()}/conformance`, data: `${ogc()}/collections`,
    });
    const { conformsTo } = (await (await api("/api/v1/ogc/conformance", { key })).json()) as { conformsTo: string[] };
    for (const c of ["core", "geojson", "oas30"]) expect(conformsTo).toContain(`http://www.opengis.net/spec/ogcapi-features-1/1.0/conf/${c}`);
  });

  it("pages of limit 5 joined in next order give every link once, in feature-id order (OGC 17-069r4 §7.15.6; derived)", async () => {
    const seen: number[] = [];
    let url: string | undefined = `/api/v1/ogc/collections/${jobId}/items?limit=5`;
    for (let pages = 0; url && pages < 1000; pages++) {
      const res = await api(url, { key });
      expect(res.status).toBe(200);
      expect(res.headers.get("content-type")).toBe("application/geo+json");
      const body = (await res.json()) as { features: { id: number }[]; numberReturned: number; links: { rel: string; href: string }[] };
      expect(body.numberReturned).toBe(body.features.length);
      seen.push(...body.features.map((f) => f.id));
      const next = body.links.find((l) => l.rel === "next")?.href;
      url = next ? next.slice(stack().url.length) : undefined;
    }
    expect(seen).toEqual(links.map((l) => l.id).sort((a, b) => a - b));
  });

  it("a single link has the artifact's geometry, and order=1 gives exactly the first-order links (derived)", async () => {
    const link = links[Math.floor(links.length / 2)];
    const one = (await (await api(`/api/v1/ogc/collections/${jobId}/items/${link.id}`, { key })).json()) as { geometry: Link["geometry"]; properties: { order: number } };
    expect(one.geometry.coordinates).toEqual(link.geometry.coordinates);
    expect(one.properties.order).toBe(link.properties.order);
    const firsts = (await (await api(`/api/v1/ogc/collections/${jobId}/items?order=1&limit=1`, { key })).json()) as { numberMatched: number };
    expect(firsts.numberMatched).toBe(links.filter((l) => l.properties.order === 1).length);
  });

  it("the collection's extent is the links' envelope in CRS84 (OGC 17-069r4 §7.14; derived)", async () => {
    const doc = (await (await api(`/api/v1/ogc/collections/${jobId}`, { key })).json()) as { extent: { spatial: { bbox: number[][] } } };
    const all = links.map(envelope);
    const expected = [Math.min(...all.map((b) => b.w)), Math.min(...all.map((b) => b.s)), Math.max(...all.map((b) => b.e)), Math.max(...all.map((b) => b.n))];
    doc.extent.spatial.bbox[0].forEach((v, i) => expect(Math.abs(v - expected[i])).toBeLessThan(1e-9));
  });

  it("unknown collection or feature → 404; bad bbox, limit or parameter → 400 problem (OGC 17-069r4 §7.15; RFC 9457)", async () => {
    for (const p of [`collections/${randomUUID()}`, "collections/not-a-job", `collections/${randomUUID()}/items`, `collections/${jobId}/items/999999999`, `collections/${jobId}/items/x`]) {
      const res = await api(`/api/v1/ogc/${p}`, { key });
      expect(res.status, p).toBe(404);
      expect(res.headers.get("content-type")).toBe("application/problem+json");
    }
    for (const q of ["bbox=1,2,3", "bbox=0,50,1,40", "bbox=a,b,c,d", "limit=0", "limit=10001", "limit=abc", "colour=red", "cursor=forged"]) {
      const res = await api(`/api/v1/ogc/collections/${jobId}/items?${q}`, { key });
      expect(res.status, q).toBe(400);
      const body = (await res.json()) as { status: number; type: string; errors: unknown[] };
      expect(body.status).toBe(400);
      expect(body.type).toBe("https://rillscale.example/problems/bad-request");
      expect(body.errors.length).toBeGreaterThan(0);
    }
  });

  it("no key → 401 with a Bearer challenge; another organisation's key sees no such collection (STANDARDS.md)", async () => {
    const none = await api(`/api/v1/ogc/collections/${jobId}/items`);
    expect(none.status).toBe(401);
    expect(none.headers.get("www-authenticate")).toMatch(/^Bearer /);
    for (const p of [`collections/${jobId}`, `collections/${jobId}/items`, `collections/${jobId}/items/${links[0].id}`]) {
      expect((await api(`/api/v1/ogc/${p}`, { key: otherKey })).status, p).toBe(404);
    }
    const theirs = (await (await api("/api/v1/ogc/collections", { key: otherKey })).json()) as { collections: { id: string }[] };
    expect(theirs.collections.map((c) => c.id)).not.toContain(jobId);
    const { stdout } = await ogrinfo([`OAPIF:${ogc()}`], otherKey);
    expect(stdout).not.toContain(jobId);
  });

  it("a job answered from the result cache serves the same links as the job that computed them (derived)", async () => {
    const job = (await (await api(`/api/v1/jobs/${jobId}`, { key })).json()) as { dataset: string; params: Record<string, unknown> };
    const again = await submitOk(key, { dataset: job.dataset, kind: "drainage", params: job.params });
    expect(again.cachedFrom).toBe(jobId);
    const page = (await (await api(`/api/v1/ogc/collections/${again.id}/items?limit=1`, { key })).json()) as { numberMatched: number };
    expect(page.numberMatched).toBe(links.length);
  });
});
