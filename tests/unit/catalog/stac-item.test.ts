import { readFileSync } from "node:fs";
import Ajv from "ajv";
import addFormats from "ajv-formats";
import { describe, expect, expectTypeOf, it } from "vitest";
import type { StacItem, StacVersion } from "stac-ts";
import { HAS_PROVENANCE, STAC_EXTENSIONS, buildStacItem, type StacJobFacts } from "@/lib/catalog/stac-item";

// Derived check: our own STAC structure schema, written from the 1.1.0 specification and compared with the official
// schema files it names in x-checked-against (tests/fixtures/schemas/README.md); not the official files themselves.
// The independent check is the type from stac-ts (generated from the official schemas) at the end of this file.
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
  it("gives an Item our derived STAC 1.1.0 structure schema accepts (derived from STAC Item Specification 1.1.0)", () => {
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

type Item = ReturnType<typeof buildStacItem>;
const [PROJECTION, FILE] = STAC_EXTENSIONS;
/** A copy of the built Item with `change` applied to it (a deep copy, so FACTS' Item stays untouched). */
const altered = (change: (item: Item & Record<string, unknown>) => void) => {
  const item = structuredClone(buildStacItem(FACTS)) as Item & Record<string, unknown>;
  change(item);
  return item;
};

describe("our derived STAC Item schema encodes the official 1.1.0 rules (stac-spec item.json, datetime.json; File 2.1.0, Projection 2.0.0 schemas)", () => {
  const refused: [string, (item: Item & Record<string, unknown>) => void][] = [
    ["another stac_version (item.json: const 1.1.0)", (i) => { (i as Record<string, unknown>).stac_version = "1.0.0"; }],
    ["a datetime with a non-UTC offset (datetime.json: UTC only)", (i) => { i.properties.datetime = "2026-12-01T11:01:00+01:00"; }],
    ["a null datetime without start and end (item.json)", (i) => { (i.properties as Record<string, unknown>).datetime = null; }],
    ["a start_datetime without end_datetime (datetime.json)", (i) => { Object.assign(i.properties, { start_datetime: "2026-12-01T10:00:00Z" }); }],
    ["a bbox beside a null geometry (item.json)", (i) => { (i as Record<string, unknown>).geometry = null; }],
    ["a bbox of 5 numbers (item.json: 4 or 6)", (i) => { i.bbox.push(0); }],
    ["a link without href (item.json)", (i) => { delete (i.links[0] as Partial<Item["links"][number]>).href; }],
    ["a link with an empty rel (item.json)", (i) => { i.links[1].rel = ""; }],
    ["a relative self link (item.json: self must be absolute)", (i) => { i.links[0].href = "stac"; }],
    ["a collection link without the collection member (item.json)", (i) => { i.links.push({ rel: "collection", href: "../collection.json", type: "application/json", title: "c" }); }],
    ["a collection member without a collection link (item.json)", (i) => { i.collection = "jobs"; }],
    ["an asset without href (item.json)", (i) => { delete (i.assets["orders.tif"] as Partial<Item["assets"][string]>).href; }],
    ["file: fields without the File extension listed (File 2.1.0)", (i) => { i.stac_extensions = [PROJECTION]; }],
    ["proj: fields without the Projection extension listed (Projection 2.0.0)", (i) => { i.stac_extensions = [FILE]; }],
    ["proj:epsg, removed in Projection 2.0.0", (i) => { Object.assign(i.properties, { "proj:epsg": 4326 }); }],
    ["an unknown file: field (File 2.1.0)", (i) => { Object.assign(i.assets["orders.tif"], { "file:md5": "ab" }); }],
    ["an upper-case checksum (File 2.1.0: lower-case hex)", (i) => { i.assets["orders.tif"]["file:checksum"] = "1220" + "C".repeat(64); }],
  ];
  for (const [what, change] of refused) {
    it(`refuses ${what}`, () => {
      expect(validate(buildStacItem(FACTS))).toBe(true); // the unaltered Item passes, so the change alone is refused
      expect(validate(altered(change))).toBe(false);
    });
  }

  it("accepts a null datetime with start_datetime and end_datetime, and a null geometry without bbox (item.json)", () => {
    expect(validate(altered((i) => { Object.assign(i.properties, { datetime: null, start_datetime: "2026-12-01T10:00:00Z", end_datetime: "2026-12-01T10:01:00+00:00" }); })), JSON.stringify(validate.errors)).toBe(true);
    expect(validate(altered((i) => { const r = i as Record<string, unknown>; r.geometry = null; delete r.bbox; })), JSON.stringify(validate.errors)).toBe(true);
  });
});

describe("buildStacItem() against the official STAC types (stac-ts, generated by json-schema-to-typescript from the stac-spec JSON schemas)", () => {
  // stac-ts 1.0.5 is generated from the 1.0.0 schemas (its StacVersion is "1.0.0"); item.json 1.1.0 requires the
  // same members, so our Item, with its version literal set aside, must be assignable to StacItem. This is a
  // compile-time check: tsc --noEmit (the typecheck suite of npm test) fails when the builder drifts from it.

  it("has the shape of the official StacItem with the version literal set aside (stac-ts; enforced by tsc --noEmit)", () => {
    const item = buildStacItem(FACTS);
    // stac-ts: our Item with only its version literal replaced extends StacItem; tsc --noEmit evaluates this, not the run
    expectTypeOf<Omit<Item, "stac_version"> & { stac_version: StacVersion }>().toExtend<StacItem>();
    expect(item.stac_version).toBe("1.1.0");
    // The check is not vacuous: an Item without links is not a StacItem (tsc fails if this line stops being an error).
    const { links: _, ...withoutLinks } = item;
    // @ts-expect-error — links is required by the official Item type
    const broken: StacItem = { ...withoutLinks, stac_version: "1.0.0" };
    expect(broken.links).toBeUndefined();
  });
});
