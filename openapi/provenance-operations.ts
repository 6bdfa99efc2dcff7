// The provenance, STAC, signing-key and webhook operations of the OpenAPI document (their bodies are partly not
// JSON: the provenance document is served as signed bytes, the signature as application/jose).
import type { OpenAPIRegistry } from "@asteasolutions/zod-to-openapi";
import type { z } from "zod";
import { jsonContent as json, registerOperations, type DocumentedOperation } from "@/openapi/operations";
import * as J from "@/lib/jobs/schemas";
import * as P from "@/lib/provenance/schemas";
import * as W from "@/lib/webhooks/schemas";

const ERROR_TEXT: Record<number, string> = {
  401: "Not authenticated.", 403: "Not allowed (role or scope).", 404: "Not found (or another organisation's).",
  409: "Conflicts with the current state.", 415: "Send application/json.", 422: "Validation failed; `errors[]` names the fields.",
};

const AUTH = [401, 403];
const jsonBody = (schema: z.ZodType) => ({ required: true, content: json(schema) }) as DocumentedOperation["body"];
const WEBHOOK_DOC = "Deliveries follow Standard Webhooks 1.0: headers `webhook-id` (the delivery id, the same on every retry), `webhook-timestamp` and `webhook-signature` (`v1,<base64 HMAC-SHA256>`; two during a secret rotation overlap). Only a 2xx answer delivers; redirects are not followed; a 410 disables the endpoint; other answers are retried with exponential backoff and jitter. Payload: `{type, timestamp, data: {id, kind, status, dataset, links}}`.";

function operations(): DocumentedOperation[] {
  return [
    {
      method: "get", path: "/api/v1/jobs/{id}/provenance", summary: "The signed W3C PROV-JSON provenance of a succeeded job", permission: "provenance:read", params: J.IdParams,
      description: "The bytes exactly as signed (canonical JSON). The detached JWS is at `provenance.jws`; public keys at `/.well-known/jwks.json`. Every download is audited.",
      ok: { status: 200, description: "The document.", content: { "application/json": { schema: { type: "object" } } } }, errors: [...AUTH, 404],
    },
    {
      method: "get", path: "/api/v1/jobs/{id}/provenance.jws", summary: "The detached JWS of the provenance document", permission: "provenance:read", params: J.IdParams,
      description: "Compact serialisation `header..signature` (RFC 7515 Appendix F) with an unencoded payload (RFC 7797: `b64: false`, `crit: [\"b64\"]`), EdDSA (Ed25519), `kid` = RFC 7638 thumbprint. Audited.",
      ok: { status: 200, description: "The JWS.", content: { "application/jose": { schema: { type: "string" } } } }, errors: [...AUTH, 404],
    },
    {
      method: "get", path: "/api/v1/jobs/{id}/stac", summary: "The STAC 1.1.0 Item of a succeeded job", permission: "results:read", params: J.IdParams,
      description: "Artifacts as assets with media types, `file:checksum` (sha2-256 multihash) and `file:size`; `proj:code` of rasters; a link to the provenance.",
      ok: { status: 200, description: "The Item.", content: { "application/geo+json": { schema: { type: "object" } } } }, errors: [...AUTH, 404, 409],
    },
    {
      method: "post", path: "/api/v1/provenance/verify", summary: "Verify a provenance document and its signature", permission: "provenance:read", body: jsonBody(P.ProvenanceVerifyBody),
      description: "Checks the detached JWS over the document's bytes against the published keys (retired keys included) and, given file hashes, that each is an input or artifact of the document. `npm run verify -- doc.json sig.jws --files …` does the same offline.",
      ok: { status: 200, description: "The verdict.", content: json(P.ProvenanceVerifyResult) }, errors: [...AUTH, 415, 422],
    },
    { method: "get", path: "/api/v1/signing-keys", summary: "Provenance signing keys (public facts)", permission: "keys:manage", ok: { status: 200, description: "Keys, newest first.", content: json(P.SigningKeyList) }, errors: AUTH },
    {
      method: "post", path: "/api/v1/signing-keys/rotate", summary: "Rotate the provenance signing key", permission: "keys:manage",
      description: "A new key signs from now on; earlier keys retire (their private halves are erased) but stay in the JWK Set, so documents they signed still verify. The worker also rotates on a schedule (RILLSCALE_SIGNING_KEY_ROTATE_DAYS).",
      ok: { status: 200, description: "The new active key and the retired ones.", content: json(P.SigningKeyRotation) }, errors: AUTH,
    },
    { method: "get", path: "/api/v1/webhooks", summary: "Webhook endpoints", permission: "keys:manage", description: WEBHOOK_DOC, ok: { status: 200, description: "Endpoints.", content: json(W.WebhookEndpointList) }, errors: AUTH },
    {
      method: "post", path: "/api/v1/webhooks", summary: "Register a webhook endpoint", permission: "keys:manage", body: jsonBody(W.WebhookCreateBody), description: WEBHOOK_DOC,
      ok: { status: 201, description: "The endpoint and its secret, shown once.", content: json(W.WebhookEndpointWithSecret) }, errors: [...AUTH, 415, 422],
    },
    { method: "get", path: "/api/v1/webhooks/{id}", summary: "A webhook endpoint", permission: "keys:manage", params: W.WebhookParams, ok: { status: 200, description: "The endpoint.", content: json(W.WebhookEndpoint) }, errors: [...AUTH, 404] },
    { method: "patch", path: "/api/v1/webhooks/{id}", summary: "Change a webhook endpoint", permission: "keys:manage", params: W.WebhookParams, body: jsonBody(W.WebhookUpdateBody), ok: { status: 200, description: "The endpoint.", content: json(W.WebhookEndpoint) }, errors: [...AUTH, 404, 415, 422] },
    { method: "delete", path: "/api/v1/webhooks/{id}", summary: "Remove a webhook endpoint", permission: "keys:manage", params: W.WebhookParams, ok: { status: 204, description: "Removed with its delivery log." }, errors: [...AUTH, 404] },
    {
      method: "post", path: "/api/v1/webhooks/{id}/rotate-secret", summary: "Rotate a webhook endpoint's secret", permission: "keys:manage", params: W.WebhookParams, body: jsonBody(W.WebhookRotateBody),
      description: "Deliveries carry signatures by both secrets until `previousSecretUntil`, so the receiver can switch without losing any.",
      ok: { status: 200, description: "The new secret, shown once.", content: json(W.WebhookEndpointWithSecret) }, errors: [...AUTH, 404, 415, 422],
    },
    { method: "get", path: "/api/v1/webhooks/{id}/deliveries", summary: "Delivery log of an endpoint", permission: "keys:manage", params: W.WebhookParams, query: W.DeliveryListQuery, ok: { status: 200, description: "Deliveries, newest first.", content: json(W.WebhookDeliveryList) }, errors: [...AUTH, 404, 422] },
    { method: "get", path: "/api/v1/webhooks/{id}/deliveries/{deliveryId}", summary: "A delivery and its attempts", permission: "keys:manage", params: W.DeliveryParams, ok: { status: 200, description: "The delivery with its attempt log.", content: json(W.WebhookDeliveryDetail) }, errors: [...AUTH, 404] },
    { method: "post", path: "/api/v1/webhooks/{id}/deliveries/{deliveryId}/redeliver", summary: "Send a delivery's message again", permission: "keys:manage", params: W.DeliveryParams, ok: { status: 202, description: "A new delivery of the same message, queued.", content: json(W.WebhookDelivery) }, errors: [...AUTH, 404, 409] },
  ];
}

export function registerProvenanceOperations(registry: OpenAPIRegistry, problem: z.ZodType): void {
  registerOperations(registry, problem, { errorText: ERROR_TEXT }, operations());
}
