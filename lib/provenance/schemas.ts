// Request and response bodies of the provenance and signing-key routes (zod with OpenAPI metadata).
import { z } from "@/lib/api/schemas";

const IsoDate = z.iso.datetime({ offset: true });

export const ProvenanceVerifyBody = z.object({
  document: z.string().min(2).max(10_000_000).openapi({ description: "The PROV-JSON document exactly as downloaded (its bytes are what was signed), as a string." }),
  signature: z.string().min(5).max(10_000).openapi({ description: "The detached compact JWS (header..signature)." }),
  files: z.array(z.object({ name: z.string().max(200), sha256: z.string().regex(/^[0-9a-f]{64}$/) })).max(1000).optional()
    .openapi({ description: "SHA-256 of files you hold (the input, artifacts), checked against the document's entities." }),
}).openapi("ProvenanceVerifyBody");

export const ProvenanceVerifyResult = z.object({
  valid: z.boolean(),
  kid: z.string().nullable(),
  error: z.string().nullable(),
  job: z.string().nullable(),
  files: z.array(z.object({ name: z.string(), ok: z.boolean(), entity: z.string().nullable() })),
}).openapi("ProvenanceVerifyResult");

export const SigningKey = z.object({ kid: z.string(), createdAt: IsoDate, retiredAt: IsoDate.nullable(), active: z.boolean() }).openapi("SigningKey");
export const SigningKeyList = z.object({ items: z.array(SigningKey) }).openapi("SigningKeyList");
export const SigningKeyRotation = z.object({ active: z.string(), retired: z.array(z.string()) }).openapi("SigningKeyRotation");
