import { readFileSync } from "node:fs";
import Ajv from "ajv";
import addFormats from "ajv-formats";
import { describe, expect, it } from "vitest";
import { canonicalJson, sha256Hex } from "@/lib/jobs/canonical-json";
import { methodsOf } from "@/lib/provenance/methods";
import { buildProvDocument, filesOfDocument, provDocumentBytes, type ProvDocument } from "@/lib/provenance/prov-json";
import { FACTS } from "@/tests/unit/provenance/fixtures";

const schema = JSON.parse(readFileSync("tests/fixtures/schemas/prov-json.derived.schema.json", "utf8"));
const ajv = new Ajv({ allErrors: true, strict: false });
addFormats(ajv);
const validate = ajv.compile(schema);

const ids = (doc: ProvDocument) => new Set([...Object.keys(doc.entity), ...Object.keys(doc.activity), ...Object.keys(doc.agent)]);

describe("buildProvDocument()", () => {
  it("gives a document the PROV-JSON structure schema accepts (Huynh et al. 2013, W3C Member Submission)", () => {
    const doc = buildProvDocument(FACTS);
    expect(validate(doc), JSON.stringify(validate.errors)).toBe(true);
  });

  it("the schema refuses a derivation without its used entity (PROV-DM 2013 §5.2.1: both entities required)", () => {
    const doc = buildProvDocument(FACTS) as unknown as { wasDerivedFrom: Record<string, Record<string, unknown>> };
    const first = Object.values(doc.wasDerivedFrom)[0];
    delete first["prov:usedEntity"];
    expect(validate(doc)).toBe(false);
  });

  it("names the input, the parameters and every artifact as entities with their SHA-256 (derived)", () => {
    const doc = buildProvDocument(FACTS);
    const files = filesOfDocument(doc);
    expect(files.map((f) => [f.role, f.label, f.sha256])).toEqual([
      ["input", "tallow-creek.tif", "a".repeat(64)],
      ["artifact", "streams.geojson", "b".repeat(64)],
      ["artifact", "orders.tif", "c".repeat(64)],
    ]);
    const params = Object.values(doc.entity).find((e) => (e["prov:type"] as { $: string }).$ === "rill:Parameters")!;
    expect(params["prov:value"]).toBe(canonicalJson(FACTS.params));
    expect(params["rill:sha256"]).toBe(sha256Hex('{"channelThreshold":{"km2":1,"method":"area"},"epsilonFill":false}'));
  });

  it("every relation points at an entity, activity or agent the document declares (invariant, derived)", () => {
    const doc = buildProvDocument({ ...FACTS, submitter: { kind: "user", id: "u1", label: "analyst@tallow-creek.example" } });
    const known = ids(doc);
    const relations = [doc.used, doc.wasGeneratedBy, doc.wasAssociatedWith, doc.wasDerivedFrom, doc.wasAttributedTo, doc.actedOnBehalfOf];
    let refs = 0;
    for (const rel of relations) for (const r of Object.values(rel)) for (const [k, v] of Object.entries(r)) {
      if (["prov:entity", "prov:activity", "prov:agent", "prov:generatedEntity", "prov:usedEntity", "prov:delegate", "prov:responsible"].includes(k)) {
        refs++;
        expect(known.has(v as string), `${k} → ${String(v)}`).toBe(true);
      }
    }
    // 2 used + 2×3 per artifact + 2 associations×2 + 3 on behalf of: (2+2)·2 + 2·(2+3+2) + 3 = 25
    expect(refs).toBe(25);
  });

  it("records the software agent with version and git commit, the org and cache reuse (derived)", () => {
    const doc = buildProvDocument({ ...FACTS, job: { ...FACTS.job, cachedFrom: "7d3f4a52-0000-4000-8000-000000000000" } });
    const software = doc.agent["rill:software-rillscale-0.1.0"];
    expect(software["prov:type"]).toEqual({ $: "prov:SoftwareAgent", type: "prov:QUALIFIED_NAME" });
    expect(software["rill:gitCommit"]).toBe(FACTS.software.gitCommit);
    const job = doc.activity[`rill:job-${FACTS.job.id}`];
    expect(job["rill:cacheReuse"]).toBe(true);
    expect(job["prov:startTime"]).toBe("2026-12-01T10:00:00.000Z");
    expect(String(job["rill:method1"])).toContain("Barnes, Lehman & Mulla (2014)");
  });

  it("writes each method that ran as rill:method1…n, name then papers, and no more (lib/provenance/methods.ts; Barnes, Lehman & Mulla 2014 from lib/hydro/priority-flood.ts)", () => {
    const job = (facts: typeof FACTS) => buildProvDocument(facts).activity[`rill:job-${facts.job.id}`];
    const methodKeys = (r: Record<string, unknown>) => Object.keys(r).filter((k) => k.startsWith("rill:method")).sort();
    const plain = job(FACTS);
    expect(methodKeys(plain)).toEqual(FACTS.methods.map((_, i) => `rill:method${i + 1}`).sort());
    expect(plain["rill:method1"]).toBe("Priority-Flood depression filling with the plain queue (Alg. 2) — Barnes, Lehman & Mulla (2014), Computers & Geosciences 62:117–127");
    const epsilonParams = { ...FACTS.params, epsilonFill: true };
    const epsilon = job({ ...FACTS, params: epsilonParams, methods: methodsOf("drainage", epsilonParams, { geographic: false }) });
    // epsilon fill replaces two methods (fill with the plain queue, flat resolution) by one (derived)
    expect(methodKeys(epsilon).length).toBe(FACTS.methods.length - 1);
    expect(Object.values(epsilon).filter((v) => String(v).startsWith("Flat resolution"))).toEqual([]);
  });

  it("the same facts always give the same bytes (invariant the signature relies on, derived)", () => {
    const a = provDocumentBytes(buildProvDocument(FACTS));
    const b = provDocumentBytes(buildProvDocument(structuredClone(FACTS)));
    expect(Buffer.from(a).equals(Buffer.from(b))).toBe(true);
    expect(JSON.parse(Buffer.from(a).toString("utf8"))).toEqual(buildProvDocument(FACTS));
  });
});
