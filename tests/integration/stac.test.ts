// STAC 1.1.0 Item of a finished job over HTTP: it validates, its assets are the job's artifacts with their
// checksums, and its provenance link leads to the signed document.
import { readFileSync } from "node:fs";
import Ajv from "ajv";
import addFormats from "ajv-formats";
import { beforeAll, describe, expect, it } from "vitest";
import { HAS_PROVENANCE } from "@/lib/catalog/stac-item";
import { AUDITOR, api, signIn, stack } from "@/tests/integration/client";
import { eventually, finishedJob } from "@/tests/integration/provenance-fixture";

// Derived check: our own STAC Item structure schema, written from the 1.1.0 specification and compared with the
// official schema files named in its x-checked-against (tests/fixtures/schemas/README.md); not the official files.
// The independent check, the official types from stac-ts, is in tests/unit/catalog/stac-item.test.ts (tsc).
const ajv = new Ajv({ allErrors: true, strict: false });
addFormats(ajv);
const validate = ajv.compile(JSON.parse(readFileSync("tests/fixtures/schemas/stac-item.derived.schema.json", "utf8")));

let jobId = "";
let item: { bbox: number[]; assets: Record<string, { href: string; "file:checksum"?: string; type: string }>; links: { rel: string; href: string }[]; properties: Record<string, unknown> };

beforeAll(async () => {
  jobId = (await finishedJob(stack().demoKeySecret, 5)).job.id;
  const res = await api(`/api/v1/jobs/${jobId}/stac`, { key: stack().demoKeySecret });
  expect(res.status, await res.clone().text()).toBe(200);
  expect(res.headers.get("content-type")).toBe("application/geo+json");
  item = await res.json();
});

describe("GET /api/v1/jobs/{id}/stac", () => {
  it("validates against our derived STAC 1.1.0 Item structure schema (derived from STAC Item Specification 1.1.0)", () => {
    expect(validate(item), JSON.stringify(validate.errors)).toBe(true);
  });

  it("lists every artifact as an asset with its sha2-256 multihash checksum and media type (File extension 2.1.0)", async () => {
    const listing = ((await (await api(`/api/v1/jobs/${jobId}/artifacts`, { key: stack().demoKeySecret })).json()) as { items: { name: string; sha256: string; mediaType: string }[] }).items;
    for (const a of listing) {
      expect(item.assets[a.name]?.["file:checksum"], a.name).toBe("1220" + a.sha256);
      expect(item.assets[a.name].type).toBe(a.mediaType);
    }
  });

  it("has the dataset's lon/lat footprint and CRS: Luxembourg at EPSG:4326 (tests/fixtures/README.md)", () => {
    const [w, s, e, n] = item.bbox;
    expect(w).toBeGreaterThan(5.5); expect(e).toBeLessThan(6.7); expect(s).toBeGreaterThan(49.3); expect(n).toBeLessThan(50.3);
    expect(item.properties["proj:code"]).toBe("EPSG:4326");
  });

  it("links the provenance document, which an auditor can fetch (W3C PROV-AQ has_provenance)", async () => {
    const link = item.links.find((l) => l.rel === HAS_PROVENANCE)!;
    const res = await eventually(new URL(link.href).pathname, { cookie: await signIn(AUDITOR) });
    expect(res.status).toBe(200);
  });
});
