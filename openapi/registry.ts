// The OpenAPI 3.1 document of /api/v1, generated from the same zod schemas the handlers parse with.
// Each operation carries `x-permission` (or `x-auth: public|session`), which the permission-matrix test checks.
import { OpenAPIRegistry, OpenApiGeneratorV31, type RouteConfig } from "@asteasolutions/zod-to-openapi";
import * as S from "@/lib/api/schemas";
import { PROBLEM_BASE, PROBLEM_TYPES } from "@/lib/api/problem";
import type { Permission } from "@/lib/auth/permissions";
import { registerDataOperations } from "@/openapi/data-operations";
import { registerOgcOperations } from "@/openapi/ogc-operations";
import { registerProvenanceOperations } from "@/openapi/provenance-operations";

type Auth = "public" | "session" | "any" | Permission;

interface Operation {
  method: RouteConfig["method"];
  path: string;
  summary: string;
  auth: Auth;
  body?: S.z.ZodType;
  bodyOptional?: true;
  params?: S.z.ZodObject;
  query?: S.z.ZodObject;
  ok: { status: number; schema?: S.z.ZodType; description: string; headers?: Record<string, string> };
  errors: number[];
}

const AUTH_ERRORS = [401, 403];

export const OPERATIONS: Operation[] = [
  { method: "post", path: "/api/v1/session", summary: "Sign in", auth: "public", body: S.SignInBody,
    ok: { status: 204, description: "Signed in; the session cookie is set.", headers: { "Set-Cookie": "The session cookie." } }, errors: [401, 403, 422, 429] },
  { method: "delete", path: "/api/v1/session", summary: "Sign out this session", auth: "session", ok: { status: 204, description: "Signed out." }, errors: AUTH_ERRORS },
  { method: "delete", path: "/api/v1/sessions", summary: "Sign out everywhere", auth: "session", ok: { status: 204, description: "Every session of the user is signed out." }, errors: AUTH_ERRORS },
  { method: "post", path: "/api/v1/password-resets", summary: "E-mail a password reset link", auth: "public", body: S.PasswordResetRequestBody,
    ok: { status: 202, description: "Accepted, whether or not the address has an account." }, errors: [403, 422] },
  { method: "post", path: "/api/v1/password-resets/confirm", summary: "Set a new password with a reset token", auth: "public", body: S.PasswordResetConfirmBody,
    ok: { status: 204, description: "Password changed; all sessions signed out." }, errors: [403, 422] },
  { method: "post", path: "/api/v1/invitations/accept", summary: "Accept an invitation", auth: "public", body: S.InvitationAcceptBody,
    ok: { status: 204, description: "Joined and signed in.", headers: { "Set-Cookie": "The session cookie." } }, errors: [403, 422] },
  { method: "get", path: "/api/v1/me", summary: "Who am I", auth: "any", ok: { status: 200, schema: S.MeResponse, description: "The caller." }, errors: [401] },
  { method: "get", path: "/api/v1/members", summary: "List members", auth: "members:manage", ok: { status: 200, schema: S.MemberList, description: "Members." }, errors: AUTH_ERRORS },
  { method: "patch", path: "/api/v1/members/{userId}", summary: "Change a member's role", auth: "members:manage", params: S.UserIdParams, body: S.MemberRoleBody,
    ok: { status: 200, schema: S.Member, description: "The member." }, errors: [...AUTH_ERRORS, 404, 409, 422] },
  { method: "delete", path: "/api/v1/members/{userId}", summary: "Remove a member", auth: "members:manage", params: S.UserIdParams,
    ok: { status: 204, description: "Removed; their sessions in this organisation end." }, errors: [...AUTH_ERRORS, 404, 409] },
  { method: "get", path: "/api/v1/invitations", summary: "List pending invitations", auth: "members:manage", ok: { status: 200, schema: S.InvitationList, description: "Pending invitations." }, errors: AUTH_ERRORS },
  { method: "post", path: "/api/v1/invitations", summary: "Invite by e-mail", auth: "members:manage", body: S.InvitationCreateBody,
    ok: { status: 201, schema: S.Invitation, description: "Invitation sent." }, errors: [...AUTH_ERRORS, 409, 422, 502] },
  { method: "get", path: "/api/v1/keys", summary: "List API keys", auth: "keys:manage", ok: { status: 200, schema: S.ApiKeyList, description: "Keys (no secrets)." }, errors: AUTH_ERRORS },
  { method: "post", path: "/api/v1/keys", summary: "Create an API key", auth: "keys:manage", body: S.ApiKeyCreateBody,
    ok: { status: 201, schema: S.ApiKeyWithSecret, description: "The key and its secret, shown once." }, errors: [...AUTH_ERRORS, 422] },
  { method: "post", path: "/api/v1/keys/{id}/rotate", summary: "Rotate an API key", auth: "keys:manage", params: S.KeyIdParams, body: S.ApiKeyRotateBody, bodyOptional: true,
    ok: { status: 200, schema: S.ApiKeyWithSecret, description: "The new secret, shown once; the old one works until graceUntil." }, errors: [...AUTH_ERRORS, 404, 409, 422] },
  { method: "post", path: "/api/v1/keys/{id}/revoke", summary: "Revoke an API key", auth: "keys:manage", params: S.KeyIdParams,
    ok: { status: 200, schema: S.ApiKeyEnvelope, description: "Revoked; refused from now on." }, errors: [...AUTH_ERRORS, 404] },
  { method: "get", path: "/api/v1/audit", summary: "Read the audit log", auth: "audit:read", query: S.AuditQuery, ok: { status: 200, schema: S.AuditList, description: "A page of events, newest first." }, errors: [...AUTH_ERRORS, 422] },
  { method: "get", path: "/api/v1/audit/verify", summary: "Verify the audit hash chain", auth: "audit:read", ok: { status: 200, schema: S.AuditVerify, description: "Result of the check." }, errors: AUTH_ERRORS },
  { method: "get", path: "/api/v1/dev/mail", summary: "Mail caught by the development SMTP catcher", auth: "mail:read-dev", ok: { status: 200, schema: S.DevMailList, description: "Caught messages, newest first." }, errors: [...AUTH_ERRORS, 404] },
  { method: "get", path: "/api/v1/health", summary: "Database and queue state", auth: "public", ok: { status: 200, schema: S.Health, description: "State." }, errors: [503] },
  { method: "get", path: "/api/v1/openapi.json", summary: "This document", auth: "public", ok: { status: 200, description: "OpenAPI 3.1 document." }, errors: [] },
];

const problemTable = Object.entries(PROBLEM_TYPES)
  .map(([k, v]) => `| \`${PROBLEM_BASE}${k}\` | ${v.status} | ${v.title} |`)
  .join("\n");

const DESCRIPTION = `Terrain roughness and river-network scaling analysis.

**Caution:** results are a screening analysis, not a substitute for licensed engineering judgment; defer to local codes and the responsible authority for flood and land-use decisions.

Authenticate scripts with \`Authorization: Bearer <API key>\` (keys look like \`rsk_<id>_<secret>\`); the console uses a session cookie. A missing or bad credential answers 401 with \`WWW-Authenticate: Bearer\`; a key without the needed scope 403 (\`insufficient_scope\`); another organisation's object 404. Each operation names what it needs in \`x-permission\` (a key scope grants the permission of the same name; the \`admin\` scope grants all).

Errors are RFC 9457 problem documents (\`application/problem+json\`) with \`request_id\`, and \`errors: [{pointer, detail}]\` for validation. Problem types:

| type | status | title |
|---|---|---|
${problemTable}`;

const STATUS_TEXT: Record<number, string> = {
  401: "Not authenticated.", 403: "Not allowed (role, scope or cross-site).", 404: "Not found.", 409: "Conflict.",
  422: "Validation failed.", 429: "Too many attempts; see Retry-After.", 502: "Mail could not be sent.", 503: "The database does not answer.",
};

/**
 * zod 4 copies prototype methods onto each schema as it is made, so a schema built before extendZodWithOpenApi ran
 * (a bundle does not promise module evaluation order) has no `.openapi()`; calling the method through the
 * prototype makes an extended copy. Registering through this class accepts such schemas.
 */
class Registry extends OpenAPIRegistry {
  override register<T extends S.z.ZodType>(refId: string, schema: T): T {
    const extended = typeof (schema as { openapi?: unknown }).openapi === "function" ? schema : (S.z.ZodType.prototype.openapi.call(schema, {}) as T);
    return super.register(refId, extended);
  }
}

export function buildOpenApiDocument() {
  const registry = new Registry();
  registry.registerComponent("securitySchemes", "apiKey", { type: "http", scheme: "bearer", description: "An API key: rsk_<id>_<secret><check>." });
  registry.registerComponent("securitySchemes", "session", { type: "apiKey", in: "cookie", name: "rillscale_session", description: "The console's session cookie (__Host-rillscale_session over HTTPS)." });
  const problem = registry.register("Problem", S.Problem);
  for (const op of OPERATIONS) {
    const responses: RouteConfig["responses"] = {
      [op.ok.status]: {
        description: op.ok.description,
        ...(op.ok.schema ? { content: { "application/json": { schema: op.ok.schema } } } : {}),
        ...(op.ok.headers ? { headers: Object.fromEntries(Object.entries(op.ok.headers).map(([h, d]) => [h, { description: d, schema: { type: "string" } }])) } : {}),
      },
    };
    for (const status of op.errors) responses[status] = { description: STATUS_TEXT[status], content: { "application/problem+json": { schema: problem } } };
    const security: Record<string, string[]>[] =
      op.auth === "public" ? [] : op.auth === "session" ? [{ session: [] }] : [{ session: [] }, { apiKey: [] }];
    registry.registerPath({
      method: op.method,
      path: op.path,
      summary: op.summary,
      security,
      ...(op.auth === "public" || op.auth === "session" || op.auth === "any" ? { "x-auth": op.auth } : { "x-permission": op.auth }),
      request: {
        ...(op.params ? { params: op.params } : {}),
        ...(op.query ? { query: op.query } : {}),
        ...(op.body ? { body: { required: !op.bodyOptional, content: { "application/json": { schema: op.body } } } } : {}),
      },
      responses,
    });
  }
  registerDataOperations(registry, problem);
  registerOgcOperations(registry, problem);
  registerProvenanceOperations(registry, problem);
  return new OpenApiGeneratorV31(registry.definitions).generateDocument({
    openapi: "3.1.0",
    info: { title: "Rillscale API", version: "1.0.0", description: DESCRIPTION },
    servers: [{ url: "/" }],
  });
}
