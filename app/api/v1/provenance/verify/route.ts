// POST /api/v1/provenance/verify — check a provenance document against its detached JWS and the published keys,
// and optionally the SHA-256 of files against the inputs and artifacts it names
import { json, parseJson, withAuth } from "@/lib/api/handler";
import { verifyDetached } from "@/lib/provenance/detached-jws";
import { publishedJwks } from "@/lib/provenance/keys";
import { filesOfDocument, type ProvDocument } from "@/lib/provenance/prov-json";
import { ProvenanceVerifyBody } from "@/lib/provenance/schemas";
import { otherMethods } from "@/lib/api/fallbacks";

export const runtime = "nodejs";

export const POST = withAuth(async ({ req, db }) => {
  const body = await parseJson(req, ProvenanceVerifyBody);
  const bytes = new TextEncoder().encode(body.document);
  let kid: string | null = null, error: string | null = null;
  try {
    kid = (await verifyDetached(bytes, body.signature, await publishedJwks(db))).kid;
  } catch (e) {
    error = (e as Error).message;
  }
  let doc: ProvDocument | null = null;
  try {
    doc = JSON.parse(body.document) as ProvDocument;
  } catch {
    error ??= "the document is not JSON";
  }
  const named = doc?.entity ? filesOfDocument(doc) : [];
  const files = (body.files ?? []).map((f) => {
    const match = named.find((n) => n.sha256 === f.sha256);
    return { name: f.name, ok: Boolean(match), entity: match?.entityId ?? null };
  });
  const job = doc?.activity ? (Object.keys(doc.activity)[0]?.replace(/^rill:job-/, "") ?? null) : null;
  return json({ valid: error === null && files.every((f) => f.ok), kid, error, job, files });
}, { permission: "provenance:read" });

export const { GET, PUT, PATCH, DELETE, OPTIONS } = otherMethods("POST");
