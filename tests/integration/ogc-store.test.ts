// storeNetworkFeatures() against the test database, then read back over HTTP: the network pipeline's property
// names, one-vertex links, idempotent re-stores, and a bbox across the antimeridian served by PostGIS.
import { randomUUID } from "node:crypto";
import { eq, sql } from "drizzle-orm";
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { jobs, networkFeatures, organisations } from "@/db/schema";
import { storeNetworkFeatures } from "@/lib/features/store-network-features";
import { api, appDb, stack } from "@/tests/integration/client";

const { pool, db } = appDb();
const jobId = randomUUID();
const line = (coordinates: number[][]) => ({ type: "LineString", coordinates });
/** Three links as lib/pipelines/network.ts writes them (strahler/shreve), two beside the antimeridian. */
const network = {
  type: "FeatureCollection",
  features: [
    { type: "Feature", id: 0, properties: { link: 0, downstream: 2, strahler: 1, shreve: 1, lengthM: 1000, dropM: null, areaM2: null }, geometry: line([[179.95, 0.1], [179.99, 0.0]]) },
    { type: "Feature", id: 1, properties: { link: 1, downstream: 2, strahler: 1, shreve: 1, lengthM: 0, dropM: null, areaM2: null }, geometry: line([[-179.95, 0.1]]) },
    { type: "Feature", id: 2, properties: { link: 2, downstream: -1, strahler: 2, shreve: 2, lengthM: 2000, dropM: 3, areaM2: 5e6 }, geometry: line([[10, 45], [10.01, 45.01], [10.02, 45.0]]) },
  ],
};

beforeAll(async () => {
  const [org] = await db.select().from(organisations).where(eq(organisations.slug, "tallow-creek"));
  const now = new Date();
  await db.insert(jobs).values({
    id: jobId, orgId: org.id, kind: "network", params: {}, cacheKey: `ogc-store-${jobId}`, status: "succeeded",
    submittedBy: { kind: "system", id: null, label: "ogc-store test" }, startedAt: now, finishedAt: now,
  });
});

afterAll(async () => {
  await db.delete(jobs).where(eq(jobs.id, jobId));
  await pool.end();
});

const get = async (path: string) => {
  const res = await api(`/api/v1/ogc/collections/${jobId}${path}`, { key: stack().demoKeySecret });
  expect(res.status, path).toBe(200);
  return (await res.json()) as { numberMatched: number; features: { id: number; geometry: { coordinates: number[][] }; properties: Record<string, unknown> }[] };
};

describe("storeNetworkFeatures()", () => {
  it("storeNetworkFeatures() twice keeps one row per link (idempotent for retried jobs; derived)", async () => {
    expect(await storeNetworkFeatures(db, jobId, network)).toBe(3);
    expect(await storeNetworkFeatures(db, jobId, network)).toBe(3);
    expect(await db.$count(networkFeatures, eq(networkFeatures.jobId, jobId))).toBe(3);
  });

  it("network.geojson's strahler/shreve come back as order/magnitude, and a one-vertex link as two equal positions (RFC 7946 §3.1.4)", async () => {
    const page = await get("/items?limit=10");
    expect(page.features.map((f) => f.properties.order)).toEqual([1, 1, 2]);
    expect(page.features.map((f) => f.properties.magnitude)).toEqual([1, 1, 2]);
    expect(page.features[2].properties).toMatchObject({ downstream: null, dropM: 3, areaM2: 5e6, lengthM: 2000 });
    expect(page.features[1].geometry.coordinates).toEqual([[-179.95, 0.1], [-179.95, 0.1]]);
  });

  it("a bbox from 179° E to 179° W holds the two links beside the antimeridian and not the one at 10° E (OGC 17-069r4 §7.15.3)", async () => {
    const page = await get("/items?bbox=179,-1,-179,1");
    expect(page.features.map((f) => f.id)).toEqual([0, 1]);
    expect((await get("/items?bbox=9,44,11,46&order=2")).features.map((f) => f.id)).toEqual([2]);
    expect((await get("/items?bbox=9,44,11,46&order=1")).numberMatched).toBe(0);
  });

  it("the bbox predicate the service uses can be answered from the GiST index on geom (PostGIS: ST_Intersects is index-assisted)", async () => {
    const plan = await db.transaction(async (tx) => {
      // With the job filter too, the planner may pick the (job_id, order) btree on a table this small;
      // the bbox predicate alone shows that the GiST index can answer it.
      await tx.execute(sql`SET LOCAL enable_seqscan = off`);
      return tx.execute(sql`EXPLAIN SELECT feature_id FROM network_features
        WHERE ST_Intersects(geom, ST_MakeEnvelope(9, 44, 11, 46, 4326))`);
    });
    expect(plan.rows.map((r) => Object.values(r)[0]).join("\n")).toContain("network_features_geom_index");
  });

  it("storeNetworkFeatures() refuses a collection holding a Point and stores nothing of it (common practice)", async () => {
    const bad = { type: "FeatureCollection", features: [{ type: "Feature", id: 9, properties: { order: 1 }, geometry: { type: "Point", coordinates: [0, 0] } }] };
    await expect(storeNetworkFeatures(db, jobId, bad)).rejects.toThrow(TypeError);
    await expect(storeNetworkFeatures(db, jobId, { type: "Feature" })).rejects.toThrow(TypeError);
    expect(await db.$count(networkFeatures, eq(networkFeatures.jobId, jobId))).toBe(3);
  });
});
