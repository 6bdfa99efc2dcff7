// The provenance document of a real finished job, read by a PROV implementation nobody here wrote: the W3C PROV
// reference library for Python, `prov` (T. D. Huynh; Debian's python3-prov 2.0.0), maintained by the author of
// the PROV-JSON serialisation (Huynh, Jewell, Sezavar Keshavarz, Michaelides, Yang & Moreau 2013, W3C Member
// Submission). tests/helpers/prov_check.py parses the served bytes with prov.read(…, format="json") and reports
// the records it understood; this file checks them against the job's own facts (API and database).
// The structure check against our derived JSON Schema stays in provenance.test.ts.
import { spawnSync } from "node:child_process";
import { existsSync, mkdtempSync, writeFileSync } from "node:fs";
import { tmpdir } from "node:os";
import path from "node:path";
import { beforeAll, describe, expect, it } from "vitest";
import { artifactEntityId, datasetEntityId, PROV_NAMESPACES } from "@/lib/provenance/prov-json";
import { AUDITOR, api, ownerPool, signIn, stack } from "@/tests/integration/client";
import { eventually, finishedJob } from "@/tests/integration/provenance-fixture";

/** Debian's interpreter: python3-prov installs into its dist-packages (scripts/bootstrap.sh, test mode). */
const DEBIAN_PYTHON = "/usr/bin/python3";
const CHECKER = "tests/helpers/prov_check.py";

interface QName { qname: string; uri: string }
interface Element { id: QName; types: string[]; "prov:type": string[]; startTime?: string; endTime?: string }
type Relation = Record<string, string | null>;
interface ProvReport {
  library: { name: string; version: string };
  namespaces: Record<string, string>;
  records: number;
  counts: Record<"entity" | "activity" | "agent" | "used" | "wasGeneratedBy" | "wasAssociatedWith" | "wasDerivedFrom" | "wasAttributedTo" | "actedOnBehalfOf", number>;
  unknownRecords: string[];
  elements: Record<"entity" | "activity" | "agent", Element[]>;
  relations: Record<"used" | "wasGeneratedBy" | "wasAssociatedWith" | "wasDerivedFrom" | "wasAttributedTo" | "actedOnBehalfOf", Relation[]>;
  roundTrip: { equal: boolean; records: number };
}

let report: ProvReport;
let jobId = "", datasetId = "";
let artifacts: string[] = [];
let job: { orgId: string; submittedBy: { kind: string; id: string }; startedAt: Date; finishedAt: Date };

const rill = (local: string) => `rill:${local}`;
const ids = (kind: keyof ProvReport["elements"], type: string) =>
  report.elements[kind].filter((e) => e["prov:type"].includes(type)).map((e) => e.id.qname).sort();

beforeAll(async () => {
  const r = await finishedJob(stack().demoKeySecret, 5);
  jobId = r.job.id;
  datasetId = r.datasetId;
  const res = await eventually(`/api/v1/jobs/${jobId}/provenance`, { cookie: await signIn(AUDITOR) });
  expect(res.status, await res.clone().text()).toBe(200);
  const file = path.join(mkdtempSync(path.join(tmpdir(), "prov-lib-")), "provenance.json");
  writeFileSync(file, new Uint8Array(await res.arrayBuffer()));

  const listing = (await (await api(`/api/v1/jobs/${jobId}/artifacts`, { key: stack().demoKeySecret })).json()) as { items: { name: string }[] };
  artifacts = listing.items.map((a) => a.name).sort();
  const pool = ownerPool();
  try {
    const { rows } = await pool.query("SELECT org_id, submitted_by, started_at, finished_at FROM jobs WHERE id = $1", [jobId]);
    job = { orgId: rows[0].org_id, submittedBy: rows[0].submitted_by, startedAt: rows[0].started_at, finishedAt: rows[0].finished_at };
  } finally {
    await pool.end();
  }

  expect(existsSync(DEBIAN_PYTHON), "Debian's python3 is missing: run `npm test` (scripts/bootstrap.sh) or apt-get install -y python3-prov").toBe(true);
  const run = spawnSync(DEBIAN_PYTHON, [CHECKER, file], { encoding: "utf8" });
  expect(run.status, `the prov library could not read the document (apt-get install -y python3-prov if it is missing):\n${run.stderr}`).toBe(0);
  report = JSON.parse(run.stdout) as ProvReport;
});

describe("the provenance document as the W3C PROV reference library for Python reads it (prov 2.0, Huynh; PROV-JSON, Huynh & Moreau et al. 2013)", () => {
  it("parses as PROV-JSON with prov.read(…, format=\"json\"), every record of a known PROV type, our namespace resolved from \"prefix\" (prov library)", () => {
    expect(report.library.name).toBe("prov");
    expect(report.library.version).toMatch(/^2\./);
    expect(report.unknownRecords).toEqual([]);
    expect(report.namespaces.rill).toBe(PROV_NAMESPACES.rill);
    for (const kind of ["entity", "activity", "agent"] as const) {
      for (const e of report.elements[kind]) expect(e.id.uri.startsWith(PROV_NAMESPACES.rill), e.id.qname).toBe(true);
    }
  });

  it("counts one entity per artifact of the job plus the input and the parameters, one activity, three agents and one relation of each kind per artifact (derived from the job's artifact list)", () => {
    const n = artifacts.length;
    expect(n).toBeGreaterThan(0);
    expect(report.counts).toEqual({
      entity: n + 2, activity: 1, agent: 3,
      used: 2, wasGeneratedBy: n, wasAssociatedWith: 2, wasDerivedFrom: n, wasAttributedTo: n, actedOnBehalfOf: 1,
    });
    expect(report.records).toBe(4 * n + 11); // (n + 2) + 1 + 3 entities, activity, agents; 2 + 2 + 1 fixed relations; 3n per artifact
  });

  it("names the input, the parameters and each artifact by the ids and prov:type the document promises (prov library; ids from lib/provenance/prov-json.ts)", () => {
    expect(ids("entity", rill("Dataset"))).toEqual([datasetEntityId(datasetId)]);
    expect(ids("entity", rill("Parameters"))).toEqual([rill(`job-${jobId}-parameters`)]);
    expect(ids("entity", rill("Artifact"))).toEqual(artifacts.map((a) => artifactEntityId(jobId, a)).sort());
    expect(ids("activity", rill("AnalysisJob"))).toEqual([rill(`job-${jobId}`)]);
  });

  it("reads the activity's prov:startTime and prov:endTime as the job's start and end (prov library; jobs table)", () => {
    const [activity] = report.elements.activity;
    expect(new Date(activity.startTime!).getTime()).toBe(job.startedAt.getTime());
    expect(new Date(activity.endTime!).getTime()).toBe(job.finishedAt.getTime());
  });

  it("has the job used the input and the parameters entities (PROV-DM used(activity, entity))", () => {
    const act = rill(`job-${jobId}`);
    expect(report.relations.used.map((u) => [u.activity, u.entity]).sort()).toEqual(
      [[act, datasetEntityId(datasetId)], [act, rill(`job-${jobId}-parameters`)]].sort());
  });

  it("has every artifact wasGeneratedBy the job and wasDerivedFrom the input through it (PROV-DM wasGeneratedBy, wasDerivedFrom)", () => {
    const act = rill(`job-${jobId}`), input = datasetEntityId(datasetId);
    const expected = artifacts.map((a) => artifactEntityId(jobId, a)).sort();
    expect(report.relations.wasGeneratedBy.map((g) => g.entity).sort()).toEqual(expected);
    for (const g of report.relations.wasGeneratedBy) expect(g.activity).toBe(act);
    expect(report.relations.wasDerivedFrom.map((d) => d.generatedEntity).sort()).toEqual(expected);
    for (const d of report.relations.wasDerivedFrom) expect([d.usedEntity, d.activity]).toEqual([input, act]);
  });

  it("has the job wasAssociatedWith the software agent and the submitting API key, on behalf of the organisation (PROV-DM wasAssociatedWith, actedOnBehalfOf)", () => {
    const act = rill(`job-${jobId}`);
    const [software] = report.elements.agent.filter((a) => a.id.qname.startsWith(rill("software-")));
    expect(software.types).toContain("prov:SoftwareAgent");
    expect(job.submittedBy.kind).toBe("api_key"); // finishedJob() submits with the demo key
    const submitter = rill(`api-key-${job.submittedBy.id}`);
    expect(report.relations.wasAssociatedWith.map((w) => [w.activity, w.agent]).sort()).toEqual([[act, software.id.qname], [act, submitter]].sort());
    expect(report.relations.actedOnBehalfOf).toEqual([{ delegate: submitter, responsible: rill(`org-${job.orgId}`), activity: act }]);
  });

  it("has every artifact wasAttributedTo the organisation, an agent of type prov:Organization (PROV-DM wasAttributedTo)", () => {
    const org = rill(`org-${job.orgId}`);
    expect(report.elements.agent.find((a) => a.id.qname === org)?.types).toEqual(["prov:Organization"]);
    expect(report.relations.wasAttributedTo.map((a) => a.entity).sort()).toEqual(artifacts.map((a) => artifactEntityId(jobId, a)).sort());
    for (const a of report.relations.wasAttributedTo) expect(a.agent).toBe(org);
  });

  it("survives a round trip: serialised back to PROV-JSON by the library and re-read, it equals the parsed document (prov's ProvDocument ==)", () => {
    expect(report.roundTrip).toEqual({ equal: true, records: report.records });
  });
});
