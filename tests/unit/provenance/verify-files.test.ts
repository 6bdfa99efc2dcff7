import { mkdtempSync, writeFileSync } from "node:fs";
import { tmpdir } from "node:os";
import path from "node:path";
import { describe, expect, it } from "vitest";
import { sha256Hex } from "@/lib/jobs/canonical-json";
import { buildProvDocument } from "@/lib/provenance/prov-json";
import { checkFiles, sha256OfFile } from "@/lib/provenance/verify-files";
import { FACTS } from "@/tests/unit/provenance/fixtures";

describe("checkFiles()", () => {
  it("matches files to the document's input and artifacts by hash, and one flipped byte makes a file match none (derived)", async () => {
    const dir = mkdtempSync(path.join(tmpdir(), "prov-files-"));
    const input = path.join(dir, "dem.tif"), artifact = path.join(dir, "streams.geojson");
    writeFileSync(input, "dem bytes");
    writeFileSync(artifact, '{"type":"FeatureCollection","features":[]}');
    const doc = buildProvDocument({
      ...FACTS,
      dataset: { ...FACTS.dataset, sha256: sha256Hex("dem bytes"), sizeBytes: 9 },
      artifacts: [{ name: "streams.geojson", sha256: (await sha256OfFile(artifact)).sha256, mediaType: "application/geo+json", sizeBytes: 42 }],
    });
    const ok = await checkFiles(doc, [input, artifact]);
    expect(ok.map((c) => c.ok)).toEqual([true, true]);
    expect(ok[1].entityId).toBe(`rill:job-${FACTS.job.id}-artifact-streams.geojson`);
    writeFileSync(artifact, '{"type":"FeatureCollection","features":[]]');
    const bad = await checkFiles(doc, [artifact]);
    expect(bad[0].ok).toBe(false);
  });

  it("sha256OfFile() of the FIPS 180-2 test message \"abc\" gives its published digest", async () => {
    const dir = mkdtempSync(path.join(tmpdir(), "prov-abc-"));
    writeFileSync(path.join(dir, "abc"), "abc");
    expect(await sha256OfFile(path.join(dir, "abc"))).toEqual({ sha256: "ba7816bf8f01cfea414140de5dae2223b00361a396177a9cb410ff61f20015ad", size: 3 });
  });
});
