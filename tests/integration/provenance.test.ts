// Signed provenance of finished jobs over HTTP against the started server and worker: the document verifies
// against the published JWK Set, tampering with it or with an artifact is caught, alg none / HS256 are refused,
// a key rotation leaves old documents verifiable, and every download is audited.
import { spawnSync } from "node:child_process";
import { mkdtempSync, readFileSync, writeFileSync } from "node:fs";
import { tmpdir } from "node:os";
import path from "node:path";
import Ajv from "ajv";
import addFormats from "ajv-formats";
import { FlattenedSign, type JSONWebKeySet } from "jose";
import { beforeAll, describe, expect, it } from "vitest";
import { verifyDetached } from "@/lib/provenance/detached-jws";
import { filesOfDocument, type ProvDocument } from "@/lib/provenance/prov-json";
import { checkFiles } from "@/lib/provenance/verify-files";
import { ADMIN, AUDITOR, api, ownerPool, signIn, stack } from "@/tests/integration/client";
import { sha256 } from "@/tests/integration/data-helpers";
import { eventually, finishedJob } from "@/tests/integration/provenance-fixture";

// Derived check: our own PROV-JSON structure schema, written from the W3C submission's text, not the published file
// (tests/fixtures/schemas/README.md). The independent check, with the W3C PROV reference library for Python (`prov`),
// is provenance-prov-library.test.ts.
const ajv = new Ajv({ allErrors: true, strict: false });
addFormats(ajv);
const validateProv = ajv.compile(JSON.parse(readFileSync("tests/fixtures/schemas/prov-json.derived.schema.json", "utf8")));

let auditor = "", admin = "", jobId = "", datasetSha = "";
let docBytes = new Uint8Array(), jws = "";
const jwks = async () => (await (await api("/.well-known/jwks.json")).json()) as JSONWebKeySet;

beforeAll(async () => {
  [auditor, admin] = [await signIn(AUDITOR), await signIn(ADMIN)];
  const r = await finishedJob(stack().demoKeySecret, 5);
  jobId = r.job.id;
  datasetSha = r.datasetSha256;
  const doc = await eventually(`/api/v1/jobs/${jobId}/provenance`, { cookie: auditor });
  expect(doc.status, await doc.clone().text()).toBe(200);
  docBytes = new Uint8Array(await doc.arrayBuffer());
  jws = await (await api(`/api/v1/jobs/${jobId}/provenance.jws`, { cookie: auditor })).text();
});

describe("GET /api/v1/jobs/{id}/provenance and provenance.jws", () => {
  it("the document verifies against /.well-known/jwks.json as a detached EdDSA JWS with an unencoded payload (RFC 7797)", async () => {
    const v = await verifyDetached(docBytes, jws, await jwks());
    expect(v.alg).toBe("EdDSA");
    expect(jws).toMatch(/^[\w-]+\.\.[\w-]+$/);
  });

  it("serves application/jose for the signature and the document's SHA-256 as its ETag (RFC 7515; derived)", async () => {
    const res = await api(`/api/v1/jobs/${jobId}/provenance.jws`, { cookie: auditor });
    expect(res.headers.get("content-type")).toBe("application/jose");
    const doc = await api(`/api/v1/jobs/${jobId}/provenance`, { cookie: auditor });
    expect(doc.headers.get("etag")).toBe(`"${sha256(docBytes)}"`);
  });

  it("validates against our derived PROV-JSON structure schema and names the input and artifacts with their hashes (derived from W3C PROV-JSON, Huynh et al. 2013)", async () => {
    const doc = JSON.parse(Buffer.from(docBytes).toString("utf8")) as ProvDocument;
    expect(validateProv(doc), JSON.stringify(validateProv.errors)).toBe(true);
    const files = filesOfDocument(doc);
    expect(files.find((f) => f.role === "input")?.sha256).toBe(datasetSha);
    const listing = (await (await api(`/api/v1/jobs/${jobId}/artifacts`, { key: stack().demoKeySecret })).json()) as { items: { name: string; sha256: string }[] };
    expect(files.filter((f) => f.role === "artifact").map((f) => [f.label, f.sha256]).sort()).toEqual(listing.items.map((a) => [a.name, a.sha256]).sort());
  });

  it("one flipped byte of the document fails verification, locally and at POST /api/v1/provenance/verify (derived)", async () => {
    const bad = docBytes.slice();
    bad[Math.floor(bad.length / 2)] ^= 0x01;
    await expect(verifyDetached(bad, jws, await jwks())).rejects.toThrow(/does not match/);
    const res = await api("/api/v1/provenance/verify", { method: "POST", cookie: auditor, body: { document: Buffer.from(bad).toString("latin1"), signature: jws } });
    expect(((await res.json()) as { valid: boolean }).valid).toBe(false);
    const good = await api("/api/v1/provenance/verify", { method: "POST", cookie: auditor, body: { document: Buffer.from(docBytes).toString("utf8"), signature: jws } });
    expect(await good.json()).toMatchObject({ valid: true, job: jobId });
  });

  it("one flipped byte of a downloaded artifact makes it match nothing in the document (derived)", async () => {
    const dir = mkdtempSync(path.join(tmpdir(), "prov-art-"));
    const res = await api(`/api/v1/jobs/${jobId}/artifacts/horton-orders.csv`, { key: stack().demoKeySecret });
    const bytes = new Uint8Array(await res.arrayBuffer());
    const good = path.join(dir, "horton-orders.csv"), bad = path.join(dir, "tampered.csv");
    writeFileSync(good, bytes);
    const flipped = bytes.slice();
    flipped[0] ^= 0x01;
    writeFileSync(bad, flipped);
    const doc = JSON.parse(Buffer.from(docBytes).toString("utf8")) as ProvDocument;
    expect((await checkFiles(doc, [good, bad])).map((c) => c.ok)).toEqual([true, false]);
  });

  it("refuses alg none and HS256 tokens, whatever key material they use (RFC 8725 §2.1, §3.1)", async () => {
    const kid = JSON.parse(Buffer.from(jws.split(".")[0], "base64url").toString()).kid as string;
    const none = Buffer.from(JSON.stringify({ alg: "none", kid, b64: false, crit: ["b64"] })).toString("base64url") + "..";
    const hmacKey = new TextEncoder().encode(JSON.stringify((await jwks()).keys[0]));
    const hs = await new FlattenedSign(docBytes).setProtectedHeader({ alg: "HS256", kid, b64: false, crit: ["b64"] }).sign(hmacKey);
    for (const signature of [none, `${hs.protected}..${hs.signature}`]) {
      await expect(verifyDetached(docBytes, signature, await jwks())).rejects.toThrow(/refused/);
      const res = await api("/api/v1/provenance/verify", { method: "POST", cookie: auditor, body: { document: Buffer.from(docBytes).toString("utf8"), signature } });
      expect(await res.json()).toMatchObject({ valid: false });
    }
  });

  it("after an admin rotates the signing key, the old document still verifies and a new job is signed by the new key (derived)", async () => {
    const oldKid = JSON.parse(Buffer.from(jws.split(".")[0], "base64url").toString()).kid as string;
    const rot = await api("/api/v1/signing-keys/rotate", { method: "POST", cookie: admin });
    expect(rot.status).toBe(200);
    const { active, retired } = (await rot.json()) as { active: string; retired: string[] };
    expect(retired).toContain(oldKid);
    const set = await jwks();
    expect(set.keys.map((k) => k.kid)).toEqual(expect.arrayContaining([oldKid, active]));
    expect((await verifyDetached(docBytes, jws, set)).kid).toBe(oldKid);
    const next = await finishedJob(stack().demoKeySecret, 6);
    const res = await eventually(`/api/v1/jobs/${next.job.id}/provenance.jws`, { cookie: auditor });
    const newJws = await res.text();
    const newDoc = new Uint8Array(await (await api(`/api/v1/jobs/${next.job.id}/provenance`, { cookie: auditor })).arrayBuffer());
    expect((await verifyDetached(newDoc, newJws, await jwks())).kid).toBe(active);
  });

  it("an analyst may not read provenance; an auditor may; another organisation gets 404 (platform permission table)", async () => {
    const analystKey = stack().demoKeySecret; // datasets/jobs/results scopes, no provenance:read
    expect((await api(`/api/v1/jobs/${jobId}/provenance`, { key: analystKey })).status).toBe(403);
    const other = await signIn("admin@brackenridge.example");
    expect((await api(`/api/v1/jobs/${jobId}/provenance`, { cookie: other })).status).toBe(404);
  });

  it("every download is in the audit log (issue 7)", async () => {
    const res = await api(`/api/v1/audit?action=provenance.download&limit=100`, { cookie: auditor });
    const items = ((await res.json()) as { items: { target: string; details: { what: string } }[] }).items.filter((e) => e.target === `job:${jobId}`);
    expect(items.map((e) => e.details.what)).toEqual(expect.arrayContaining(["document", "signature"]));
  });

  it("npm run verify checks the document, signature and an artifact against the server's keys (derived)", async () => {
    const dir = mkdtempSync(path.join(tmpdir(), "prov-cli-"));
    writeFileSync(path.join(dir, "doc.json"), docBytes);
    writeFileSync(path.join(dir, "sig.jws"), jws);
    const art = new Uint8Array(await (await api(`/api/v1/jobs/${jobId}/artifacts/horton-orders.csv`, { key: stack().demoKeySecret })).arrayBuffer());
    writeFileSync(path.join(dir, "orders.csv"), art);
    const run = (doc: string) => spawnSync("npx", ["tsx", "scripts/verify.ts", doc, path.join(dir, "sig.jws"), "--url", stack().url, "--files", path.join(dir, "orders.csv")], { encoding: "utf8" });
    const ok = run(path.join(dir, "doc.json"));
    expect(ok.status, ok.stdout + ok.stderr).toBe(0);
    expect(ok.stdout).toContain("file ok");
    writeFileSync(path.join(dir, "bad.json"), Buffer.concat([Buffer.from(docBytes), Buffer.from(" ")]));
    expect(run(path.join(dir, "bad.json")).status).toBe(1);
  });

  it("the database holds no private key in plain form: sealed while active, erased once retired (derived)", async () => {
    const pool = ownerPool();
    try {
      const { rows } = await pool.query<{ public_jwk: Record<string, unknown>; sealed_private_jwk: string | null; retired_at: Date | null }>(
        "SELECT public_jwk, sealed_private_jwk, retired_at FROM signing_keys");
      expect(rows.length).toBeGreaterThanOrEqual(2);
      for (const r of rows) {
        expect(r.public_jwk.d).toBeUndefined();
        if (r.retired_at) expect(r.sealed_private_jwk).toBeNull();
        else {
          expect(r.sealed_private_jwk).toMatch(/^v1\.[\w-]+\.[\w-]+$/);
          expect(r.sealed_private_jwk).not.toContain('"d"');
        }
      }
    } finally {
      await pool.end();
    }
  });
});
