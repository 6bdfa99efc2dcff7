import { readFileSync } from "node:fs";
import Ajv from "ajv";
import addFormats from "ajv-formats";
import { describe, expect, it } from "vitest";
import { HAS_PROVENANCE, buildStacItem, type StacJobFacts } from "@/lib/catalog/stac-item";

// Our STAC structure schema, written from the 1.1.0 specification's text (tests/fixtures/schemas/README.md).
const ajv = new Ajv({ allErrors: true, strict: false });
addFormats(ajv);
const validate = ajv.compile(JSON.parse(readFileSync("tests/fixtures/schemas/stac-item.derived.schema.json", "utf8")));

const FACTS: StacJobFacts = {
  baseUrl: "http://127.0.0.1:3000/",
  job: { id: "7d3f4a52-0000-4000-8000-000000000001", kind: "drainage", createdAt: new Date("2026-12-01T10:00:00Z"), finishedAt: new Date("2026-12-01T10:01:00Z"), cachedFrom: null },
  dataset: { id: "d1", name: "tallow-creek.tif" },
  bboxLonLat: [5.74, 49.45, 6.53, 50.19],
  epsg: 4326,
  software: { name: "rillscale", version: "0.1.0" },
  artifacts: [
    { name: "orders.tif", mediaType: "image/tiff; application=geotiff", sizeBytes: 4096, sha256: "c".repeat(64) },
    { name: "horton-orders.csv", mediaType: "text/csv; charset=utf-8", sizeBytes: 120, sha256: "d".repeat(64) },
  ],
};

describe("buildStacItem()", () => {
  it("gives an Item our STAC 1.1.0 structure schema accepts (STAC Item Specification 1.1.0)", () => {
    const item = buildStacItem(FACTS);
    expect(validate(item), JSON.stringify(validate.errors)).toBe(true);
  });

  it("the schema refuses an Item with a geometry but no bbox (STAC 1.1.0: bbox required when geometry is set)", () => {
    const { bbox: _, ...item } = buildStacItem(FACTS);
    expect(validate(item)).toBe(false);
  });

  it("states each artifact's SHA-256 as a sha2-256 multihash and the raster CRS (File 2.1.0, Projection 2.0.0)", () => {
    const item = buildStacItem(FACTS);
    expect(item.assets["orders.tif"]["file:checksum"]).toBe("1220" + "c".repeat(64));
    expect(item.assets["orders.tif"]["proj:code"]).toBe("EPSG:4326");
    expect(item.assets["horton-orders.csv"]["proj:code"]).toBeUndefined();
    expect(item.properties["proj:code"]).toBe("EPSG:4326");
  });

  it("links the provenance document and closes the footprint ring on its first corner (PROV-AQ; RFC 7946 §3.1.6)", () => {
    const item = buildStacItem(FACTS);
    expect(item.links.find((l) => l.rel === HAS_PROVENANCE)?.href).toBe(`http://127.0.0.1:3000/api/v1/jobs/${FACTS.job.id}/provenance`);
    const ring = item.geometry.coordinates[0];
    expect(ring[0]).toEqual(ring[ring.length - 1]);
    expect(ring).toHaveLength(5);
  });

  it("refuses a bbox whose west is east of its east (derived)", () => {
    expect(() => buildStacItem({ ...FACTS, bboxLonLat: [7, 49, 6, 50] })).toThrow(RangeError);
  });
});
