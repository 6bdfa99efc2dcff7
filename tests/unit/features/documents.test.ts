import { describe, expect, it } from "vitest";
import type { JobRow } from "@/db/schema";
import { CONFORMANCE_CLASSES, collectionDoc, featureCollectionOf, landingPage } from "@/lib/features/documents";
import type { NetworkCollection } from "@/lib/features/network-collections";

const bases = { ogc: "https://rs.example/api/v1/ogc", openapi: "https://rs.example/api/v1/openapi.json" };
const job = { id: "7b0c8a3e-1d2f-4a5b-9c6d-0e1f2a3b4c5d", kind: "drainage", finishedAt: new Date("2026-01-02T03:04:05Z") } as JobRow;
const collection: NetworkCollection = { job, featureCount: 2, bbox: [5.8, 49.4, 6.6, 50.2] };
const row = (id: number) => ({ id, downstream: null, order: 1, magnitude: 1, lengthM: 900, dropM: 12, areaM2: 1e6, geometry: '{"type":"LineString","coordinates":[[6,49.5],[6.01,49.51]]}' });

describe("feature service documents", () => {
  it("landingPage() links self, service-desc, conformance and data (OGC 17-069r4 /req/core/root-success)", () => {
    const rels = landingPage(bases).links.map((l) => l.rel);
    expect(rels).toEqual(["self", "service-desc", "conformance", "data"]);
  });

  it("the conformance classes are core, geojson and oas30 of Part 1 1.0 (OGC 17-069r4 Annex A)", () => {
    expect(CONFORMANCE_CLASSES.map((c) => c.split("/").pop())).toEqual(["core", "geojson", "oas30"]);
  });

  it("collectionDoc() gives the extent in CRS84 and an items link of type application/geo+json (OGC 17-069r4 §7.14)", () => {
    const doc = collectionDoc(bases, collection);
    expect(doc.extent?.spatial.bbox).toEqual([[5.8, 49.4, 6.6, 50.2]]);
    expect(doc.extent?.spatial.crs).toBe("http://www.opengis.net/def/crs/OGC/1.3/CRS84");
    expect(doc.links.find((l) => l.rel === "items")).toEqual({ href: `${bases.ogc}/collections/${job.id}/items`, rel: "items", type: "application/geo+json", title: "The stream links" });
  });

  it("featureCollectionOf() keeps the query in next, replacing only the cursor; the last page has no next (OGC 17-069r4 §7.15.6)", () => {
    const query = new URLSearchParams("limit=2&bbox=5,49,7,51&cursor=old");
    const page = featureCollectionOf(bases, collection, { features: [row(1), row(2)], numberMatched: 5 }, query, "new", new Date(0));
    const next = new URL(page.links.find((l) => l.rel === "next")!.href);
    expect(Object.fromEntries(next.searchParams)).toEqual({ limit: "2", bbox: "5,49,7,51", cursor: "new" });
    expect(page.numberReturned).toBe(2);
    expect(page.features[0]).not.toHaveProperty("crs"); // RFC 7946 §4: no crs member
    const last = featureCollectionOf(bases, collection, { features: [row(5)], numberMatched: 5 }, new URLSearchParams(), null, new Date(0));
    expect(last.links.map((l) => l.rel)).toEqual(["self", "collection"]);
    expect(last.links[0].href).toBe(`${bases.ogc}/collections/${job.id}/items`);
  });
});
