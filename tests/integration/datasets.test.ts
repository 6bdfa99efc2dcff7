// Datasets over HTTP: raw and multipart uploads streamed, hashed and inspected before they are accepted,
// metadata, deduplication by content, listing with filters and a cursor, reading, deleting, other orgs' ids.
import { randomUUID } from "node:crypto";
import { beforeAll, describe, expect, it } from "vitest";
import { systemClock } from "@/lib/auth/clock";
import { acceptDataset, deleteDataset } from "@/lib/datasets/registry";
import { stageToTempFile } from "@/lib/ingest/stream-to-store";
import { contentKey, type ObjectStore } from "@/lib/storage";
import { ADMIN, OTHER_ADMIN, api, appDb, createKey, ownerPool, signIn, stack } from "@/tests/integration/client";
import { binaryTreeGeoJson, countRows, fixture, sha256, stagingDir, testStore, upload, uploadOk } from "@/tests/integration/data-helpers";

let key = "";
let otherKey = "";

beforeAll(async () => {
  key = (await createKey(await signIn(ADMIN), ["datasets:write", "jobs:read"], "datasets suite")).secret;
  otherKey = (await createKey(await signIn(OTHER_ADMIN), ["admin"], "datasets suite other org")).secret;
});

describe("POST /api/v1/datasets", () => {
  it("a raw image/tiff body becomes a dataset with the metadata read before acceptance (tests/fixtures/README.md: 403 × 344 Int16, 3″ cells)", async () => {
    const f = fixture("debian/jacksboro.tif");
    const res = await upload(key, f.bytes, "image/tiff", "?filename=jacksboro.tif");
    expect([200, 201]).toContain(res.status);
    const d = (await res.json()) as { id: string; sha256: string; sizeBytes: number; name: string; format: string; metadata: Record<string, any> };
    expect(res.headers.get("location")).toBe(`/api/v1/datasets/${d.id}`);
    expect(d).toMatchObject({ name: "jacksboro.tif", format: "geotiff", sha256: sha256(f.bytes), sizeBytes: f.bytes.length });
    expect(d.metadata).toMatchObject({ kind: "raster", width: 403, height: 344, dataType: "Int16", crs: { epsg: 4326, geographic: true } });
    const [w, s, e, n] = d.metadata.bboxLonLat as number[];
    expect([w, s, e, n].map((v) => Number(v.toFixed(3)))).toEqual([-84.414, 36.446, -84.078, 36.733]);
    expect(res.headers.get("ratelimit-policy")).toMatch(/"per-key";q=\d+;w=60/);
  });

  it("the same bytes again give the existing dataset (200, same id) and store nothing twice (issue 6)", async () => {
    const f = fixture("debian/jacksboro.tif");
    const a = await uploadOk(key, f.bytes, "image/tiff");
    const res = await upload(key, f.bytes, "image/tiff");
    expect(res.status).toBe(200);
    expect(((await res.json()) as { id: string }).id).toBe(a.id);
    expect(await countRows("SELECT count(*) AS n FROM datasets WHERE sha256 = $1", [a.sha256])).toBe(1);
  });

  it("a multipart/form-data body is streamed too; the part's file name names the dataset (RFC 7578)", async () => {
    const f = fixture("debian/elev.tif");
    const form = new FormData();
    form.append("file", new Blob([f.bytes as Uint8Array<ArrayBuffer>], { type: "image/tiff" }), "luxembourg.tif");
    const res = await fetch(`${stack().url}/api/v1/datasets`, { method: "POST", headers: { authorization: `Bearer ${key}` }, body: form });
    expect([200, 201]).toContain(res.status);
    const d = (await res.json()) as { name: string; sha256: string; metadata: Record<string, unknown> };
    expect(d.sha256).toBe(sha256(f.bytes));
    expect(d.metadata).toMatchObject({ width: 95, height: 90, nodata: -32768 });
  });

  it("GeoJSON lines give feature, line and vertex counts and a lon/lat bbox (RFC 7946)", async () => {
    const bytes = binaryTreeGeoJson();
    const d = await uploadOk(key, bytes, "application/geo+json", "?filename=tree.geojson");
    expect(d.format).toBe("geojson");
    expect(d.metadata).toMatchObject({ kind: "lines", featureCount: 31, lineCount: 31, vertexCount: 62, crs: { epsg: 4326 } });
  });

  it("a body that is not an upload type answers 415; no body answers 400 (RFC 9110 §15.5.16)", async () => {
    expect((await upload(key, new TextEncoder().encode("hello"), "text/plain")).status).toBe(415);
    const empty = await fetch(`${stack().url}/api/v1/datasets`, { method: "POST", headers: { authorization: `Bearer ${key}`, "content-type": "image/tiff" } });
    expect(empty.status).toBe(400);
  });

  it("a key without datasets:write is refused with 403 (STANDARDS.md)", async () => {
    const readOnly = (await createKey(await signIn(ADMIN), ["jobs:read"], "datasets read only")).secret;
    expect((await upload(readOnly, fixture("debian/elev.tif").bytes, "image/tiff")).status).toBe(403);
  });
});

describe("GET and DELETE /api/v1/datasets", () => {
  it("lists newest first with filters and an opaque cursor; pages do not overlap (derived)", async () => {
    const p1 = (await (await api("/api/v1/datasets?limit=1", { key })).json()) as { items: { id: string }[]; nextCursor: string | null };
    expect(p1.items).toHaveLength(1);
    expect(p1.nextCursor).not.toBeNull();
    const p2 = (await (await api(`/api/v1/datasets?limit=1&cursor=${p1.nextCursor}`, { key })).json()) as { items: { id: string }[] };
    expect(p2.items[0].id).not.toBe(p1.items[0].id);
    const geo = (await (await api("/api/v1/datasets?format=geojson", { key })).json()) as { items: { format: string }[] };
    expect(geo.items.length).toBeGreaterThan(0);
    expect(geo.items.every((d) => d.format === "geojson")).toBe(true);
    expect((await api("/api/v1/datasets?cursor=bogus", { key })).status).toBe(422);
  });

  it("another organisation's dataset id answers 404 exactly like an unknown id (STANDARDS.md)", async () => {
    const d = await uploadOk(key, fixture("debian/elev.tif").bytes, "image/tiff");
    const strip = async (r: Response) => {
      const { request_id: _r, detail: _d, ...rest } = (await r.json()) as Record<string, unknown>;
      return { status: r.status, ...rest };
    };
    const theirs = await strip(await api(`/api/v1/datasets/${d.id}`, { key: otherKey }));
    const unknown = await strip(await api(`/api/v1/datasets/${randomUUID()}`, { key: otherKey }));
    expect(theirs).toEqual(unknown);
    expect(theirs.status).toBe(404);
    expect((await api(`/api/v1/datasets/${d.id}`, { method: "DELETE", key: otherKey })).status).toBe(404);
  });

  it("DELETE removes the row and the stored object, and is audited (issue 6)", async () => {
    const bytes = new TextEncoder().encode(JSON.stringify({ type: "Feature", properties: {}, geometry: { type: "LineString", coordinates: [[0, 0], [0.01, 0.02], [0.03, 0.02]] } }));
    const d = await uploadOk(key, bytes, "application/geo+json");
    expect((await api(`/api/v1/datasets/${d.id}`, { method: "DELETE", key })).status).toBe(204);
    expect((await api(`/api/v1/datasets/${d.id}`, { key })).status).toBe(404);
    expect(await countRows("SELECT count(*) AS n FROM datasets WHERE id = $1", [d.id])).toBe(0);
    expect(await testStore().exists(contentKey(d.sha256, "datasets"))).toBe(false);
    expect(await countRows("SELECT count(*) AS n FROM audit_events WHERE action = 'dataset.delete' AND target = $1", [`dataset:${d.id}`])).toBe(1);
    expect(await countRows("SELECT count(*) AS n FROM audit_events WHERE action = 'dataset.create' AND target = $1", [`dataset:${d.id}`])).toBe(1);
  });
});

describe("the same bytes deleted by one organisation while another uploads them", () => {
  it("are never recorded without their object: the upload that reused them is refused with 409 and nothing kept, and sent again it succeeds (derived: the object is shared)", async () => {
    const bytes = new TextEncoder().encode(JSON.stringify({ type: "Feature", properties: { run: randomUUID() }, geometry: { type: "LineString", coordinates: [[0, 0], [0.02, 0.01]] } }));
    const held = await uploadOk(key, bytes, "application/geo+json");
    const objectKey = contentKey(held.sha256, "datasets");
    const owner = ownerPool();
    const orgOf = async (slug: string) => (await owner.query("SELECT id FROM organisations WHERE slug = $1", [slug])).rows[0].id as string;
    const [tallow, brackenridge] = [await orgOf("tallow-creek"), await orgOf("brackenridge")];
    await owner.end();
    const { pool, db } = appDb();
    // The upload pauses once it has found the object already stored (so it will reuse it), before its row
    // exists; the other organisation's delete then runs to its end, removing the object no row uses.
    let reachedPause!: () => void, resume!: () => void;
    const paused = new Promise<void>((r) => (reachedPause = r)), resumed = new Promise<void>((r) => (resume = r));
    const store = testStore();
    const gated = new Proxy(store, {
      get: (target, name) => name === "head"
        ? async (k: string) => {
          const info = await target.head(k);
          reachedPause();
          await resumed;
          return info;
        }
        : (target[name as keyof ObjectStore] as unknown as (...a: unknown[]) => unknown).bind?.(target) ?? target[name as keyof ObjectStore],
    }) as ObjectStore;
    const acting = (orgId: string) => ({ orgId, actor: { kind: "system" as const, id: null, label: "concurrency test" }, ip: null });
    const body = { name: "shared.geojson", format: "geojson" as const, mediaType: "application/geo+json", metadata: {} };
    const rowsOfOther = () => countRows("SELECT count(*) AS n FROM datasets WHERE sha256 = $1 AND org_id = $2", [held.sha256, brackenridge]);
    try {
      const accepting = acceptDataset(db, gated, systemClock, acting(brackenridge), await stageToTempFile(bytes, stagingDir(), { maxBytes: 1 << 20 }), body);
      await paused;
      await deleteDataset(db, store, systemClock, acting(tallow), held.id);
      expect(await store.exists(objectKey)).toBe(false); // derived: no row used it any more
      resume();
      await expect(accepting).rejects.toMatchObject({ kind: "conflict" });
      expect(await rowsOfOther()).toBe(0);
      // sent again, the bytes are stored afresh and recorded
      const again = await acceptDataset(db, store, systemClock, acting(brackenridge), await stageToTempFile(bytes, stagingDir(), { maxBytes: 1 << 20 }), body);
      expect(again.created).toBe(true);
      expect(await rowsOfOther()).toBe(1);
      expect(await store.exists(objectKey)).toBe(true);
    } finally {
      resume();
      await pool.end();
    }
  });
});
