// W3C PROV-JSON (Huynh, Jewell, Sezavar Keshavarz, Michaelides, Yang & Moreau 2013, W3C Member Submission) of
// one finished job, in the terms of PROV-DM (Moreau & Missier 2013, W3C Recommendation): entities for the
// input, the parameters and each artifact; the job as an activity; the software, the organisation and the
// submitter as agents; the relations between them; and, on the activity, the methods that ran with their papers.
// Pure: every fact comes in through ProvJobFacts.
import { canonicalJson, sha256Hex } from "@/lib/jobs/canonical-json";
import type { MethodCitation } from "@/lib/provenance/methods";

export const PROV_NAMESPACES = {
  prov: "http://www.w3.org/ns/prov#",
  xsd: "http://www.w3.org/2001/XMLSchema#",
  rill: "https://rillscale.example/ns/provenance#",
} as const;

/** A PROV-JSON typed literal (§2.3 of the submission): the lexical form and its XSD type. */
export interface TypedLiteral {
  $: string;
  type: string;
}

type AttrValue = string | number | boolean | TypedLiteral;
export type ProvRecord = Record<string, AttrValue>;

export interface ProvDocument {
  prefix: Record<string, string>;
  entity: Record<string, ProvRecord>;
  activity: Record<string, ProvRecord>;
  agent: Record<string, ProvRecord>;
  used: Record<string, ProvRecord>;
  wasGeneratedBy: Record<string, ProvRecord>;
  wasAssociatedWith: Record<string, ProvRecord>;
  wasDerivedFrom: Record<string, ProvRecord>;
  wasAttributedTo: Record<string, ProvRecord>;
  actedOnBehalfOf: Record<string, ProvRecord>;
}

export interface ProvFileFacts {
  sha256: string;
  mediaType: string;
  sizeBytes: number;
}

export interface ProvJobFacts {
  job: {
    id: string;
    kind: string;
    startedAt: Date;
    finishedAt: Date;
    attempts: number;
    workerHost: string | null;
    /** The job whose result was reused (result cache), or null when this job computed it. */
    cachedFrom: string | null;
  };
  dataset: ProvFileFacts & { id: string; name: string; uploadedAt: Date };
  /** The parameters with every default filled in (they are hashed canonically). */
  params: Record<string, unknown>;
  artifacts: (ProvFileFacts & { name: string })[];
  software: { name: string; version: string; gitCommit: string | null };
  org: { id: string; name: string };
  submitter: { kind: "user" | "api_key"; id: string; label: string };
  /** The methods that produced the numbers, in the order they ran (lib/provenance/methods.ts methodsOf). */
  methods: readonly MethodCitation[];
}

/** One method as the document writes it: its name, then each paper as "Authors (year), reference". */
export const citationText = (m: MethodCitation): string =>
  `${m.name} — ${m.papers.map((p) => `${p.authors} (${p.year}), ${p.reference}`).join("; ")}`;

const dateTime = (d: Date): TypedLiteral => ({ $: d.toISOString(), type: "xsd:dateTime" });
// PROV-DM's own times (prov:startTime, prov:endTime, prov:time) are written as plain xsd:dateTime strings, as
// the submission's examples do; qualified names in attribute values are typed as prov:QUALIFIED_NAME (§2.3).
const time = (d: Date) => d.toISOString();
const qname = (name: string): TypedLiteral => ({ $: name, type: "prov:QUALIFIED_NAME" });

export const datasetEntityId = (id: string) => `rill:dataset-${id}`;
export const artifactEntityId = (jobId: string, name: string) => `rill:job-${jobId}-artifact-${name}`;

/**
 * The document's members are built in a fixed order so the same facts always serialise to the same bytes
 * (the signature is over those bytes; rebuilding a document from the database gives the one that was signed).
 */
export function buildProvDocument(f: ProvJobFacts): ProvDocument {
  const jobId = `rill:job-${f.job.id}`;
  const paramsId = `rill:job-${f.job.id}-parameters`;
  const datasetId = datasetEntityId(f.dataset.id);
  const softwareId = `rill:software-${f.software.name}-${f.software.version}`;
  const orgId = `rill:org-${f.org.id}`;
  const submitterId = `rill:${f.submitter.kind === "user" ? "user" : "api-key"}-${f.submitter.id}`;
  const paramsJson = canonicalJson(f.params);

  const entity: Record<string, ProvRecord> = {
    [datasetId]: {
      "prov:type": qname("rill:Dataset"), "prov:label": f.dataset.name, "rill:sha256": f.dataset.sha256,
      "rill:mediaType": f.dataset.mediaType, "rill:sizeBytes": f.dataset.sizeBytes, "rill:uploadedAt": dateTime(f.dataset.uploadedAt),
    },
    [paramsId]: { "prov:type": qname("rill:Parameters"), "prov:value": paramsJson, "rill:sha256": sha256Hex(paramsJson), "rill:mediaType": "application/json" },
  };
  const used: Record<string, ProvRecord> = {
    "_:used-input": { "prov:activity": jobId, "prov:entity": datasetId, "prov:role": qname("rill:input") },
    "_:used-parameters": { "prov:activity": jobId, "prov:entity": paramsId, "prov:role": qname("rill:parameters") },
  };
  const wasGeneratedBy: Record<string, ProvRecord> = {};
  const wasDerivedFrom: Record<string, ProvRecord> = {};
  const wasAttributedTo: Record<string, ProvRecord> = {};
  for (const a of f.artifacts) {
    const id = artifactEntityId(f.job.id, a.name);
    entity[id] = { "prov:type": qname("rill:Artifact"), "prov:label": a.name, "rill:sha256": a.sha256, "rill:mediaType": a.mediaType, "rill:sizeBytes": a.sizeBytes };
    wasGeneratedBy[`_:generated-${a.name}`] = { "prov:entity": id, "prov:activity": jobId, "prov:time": time(f.job.finishedAt) };
    wasDerivedFrom[`_:derived-${a.name}`] = { "prov:generatedEntity": id, "prov:usedEntity": datasetId, "prov:activity": jobId };
    wasAttributedTo[`_:attributed-${a.name}`] = { "prov:entity": id, "prov:agent": orgId };
  }

  const activity: ProvRecord = {
    "prov:type": qname("rill:AnalysisJob"), "prov:label": `${f.job.kind} analysis`, "rill:kind": f.job.kind,
    "prov:startTime": time(f.job.startedAt), "prov:endTime": time(f.job.finishedAt),
    "rill:attempts": f.job.attempts, "rill:cacheReuse": f.job.cachedFrom !== null,
  };
  if (f.job.workerHost) activity["rill:workerHost"] = f.job.workerHost;
  if (f.job.cachedFrom) activity["rill:reusedResultOf"] = qname(`rill:job-${f.job.cachedFrom}`);
  f.methods.forEach((m, i) => {
    activity[`rill:method${i + 1}`] = citationText(m);
  });

  const software: ProvRecord = { "prov:type": qname("prov:SoftwareAgent"), "prov:label": f.software.name, "rill:version": f.software.version };
  if (f.software.gitCommit) software["rill:gitCommit"] = f.software.gitCommit;

  return {
    prefix: { ...PROV_NAMESPACES },
    entity,
    activity: { [jobId]: activity },
    agent: {
      [softwareId]: software,
      [orgId]: { "prov:type": qname("prov:Organization"), "prov:label": f.org.name },
      [submitterId]: f.submitter.kind === "user"
        ? { "prov:type": qname("prov:Person"), "prov:label": f.submitter.label }
        : { "prov:type": qname("prov:SoftwareAgent"), "prov:label": `API key ${f.submitter.label}` },
    },
    used,
    wasGeneratedBy,
    wasAssociatedWith: {
      "_:associated-software": { "prov:activity": jobId, "prov:agent": softwareId, "prov:role": qname("rill:executor") },
      "_:associated-submitter": { "prov:activity": jobId, "prov:agent": submitterId, "prov:role": qname("rill:submitter") },
    },
    wasDerivedFrom,
    wasAttributedTo,
    actedOnBehalfOf: { "_:on-behalf-of-org": { "prov:delegate": submitterId, "prov:responsible": orgId, "prov:activity": jobId } },
  };
}

/** The bytes that are signed and served: canonical JSON (sorted keys, no whitespace) in UTF-8. */
export const provDocumentBytes = (doc: ProvDocument): Uint8Array => new TextEncoder().encode(canonicalJson(doc));

/** The files a document names, for re-hashing: the input and each artifact, by entity id. */
export function filesOfDocument(doc: ProvDocument): { entityId: string; label: string; role: "input" | "artifact"; sha256: string; sizeBytes: number }[] {
  return Object.entries(doc.entity)
    .map(([entityId, e]) => ({ entityId, e, type: (e["prov:type"] as TypedLiteral | undefined)?.$ }))
    .filter(({ type }) => type === "rill:Dataset" || type === "rill:Artifact")
    .map(({ entityId, e, type }) => ({
      entityId, label: String(e["prov:label"]), role: type === "rill:Dataset" ? "input" as const : "artifact" as const,
      sha256: String(e["rill:sha256"]), sizeBytes: Number(e["rill:sizeBytes"]),
    }));
}
