// Request and response bodies of /api/v1, in zod: handlers parse with them, the console validates its
// forms with them, and openapi/registry.ts turns them into the OpenAPI 3.1 document.
import { extendZodWithOpenApi } from "@asteasolutions/zod-to-openapi";
import { z } from "zod";
import { PERMISSIONS, ROLES, SCOPES } from "@/lib/auth/permissions";

extendZodWithOpenApi(z);

export { z };

// bcrypt reads only the first 72 bytes of a password; longer ones are refused rather than silently cut.
export const BCRYPT_MAX_BYTES = 72;
export const PASSWORD_MIN_CHARS = 10;
const utf8Bytes = (s: string) => new TextEncoder().encode(s).length;

export const RoleSchema = z.enum(ROLES).openapi("Role");
export const ScopeSchema = z.enum(SCOPES).openapi("Scope");
export const PermissionSchema = z.enum(PERMISSIONS).openapi("Permission");

export const EmailSchema = z.string().trim().toLowerCase().pipe(z.email({ message: "must be an e-mail address" }).max(254));

/** A password someone is choosing now (reset, invitation). */
export const NewPasswordSchema = z
  .string()
  .min(PASSWORD_MIN_CHARS, { message: `must be at least ${PASSWORD_MIN_CHARS} characters` })
  .refine((s) => utf8Bytes(s) <= BCRYPT_MAX_BYTES, {
    message: `must be at most ${BCRYPT_MAX_BYTES} bytes in UTF-8 (bcrypt ignores anything longer); choose a shorter passphrase`,
  })
  .openapi({ description: `At least ${PASSWORD_MIN_CHARS} characters and at most ${BCRYPT_MAX_BYTES} bytes in UTF-8.` });

const IsoDate = z.iso.datetime({ offset: true }).openapi({ example: "2026-12-01T12:00:00.000Z" });
const Uuid = z.uuid();

// ── Session ──────────────────────────────────────────────────────────────────────────────────────
export const SignInBody = z
  .object({
    email: EmailSchema,
    password: z
      .string()
      .min(1, { message: "is required" })
      .refine((s) => utf8Bytes(s) <= BCRYPT_MAX_BYTES, { message: `must be at most ${BCRYPT_MAX_BYTES} bytes in UTF-8` }),
  })
  .openapi("SignInBody");

export const PasswordResetRequestBody = z.object({ email: EmailSchema }).openapi("PasswordResetRequestBody");
export const PasswordResetConfirmBody = z
  .object({ token: z.string().min(1).max(200), password: NewPasswordSchema })
  .openapi("PasswordResetConfirmBody");
export const InvitationAcceptBody = z
  .object({ token: z.string().min(1).max(200), name: z.string().trim().min(1).max(120), password: NewPasswordSchema })
  .openapi("InvitationAcceptBody");

// ── Who am I ─────────────────────────────────────────────────────────────────────────────────────
export const UserSummary = z.object({ id: Uuid, email: z.string(), name: z.string() }).openapi("UserSummary");
export const OrgSummary = z.object({ id: Uuid, name: z.string(), slug: z.string() }).openapi("OrgSummary");
export const MeResponse = z
  .object({
    kind: z.enum(["session", "api_key"]),
    user: UserSummary.optional(),
    org: OrgSummary,
    role: RoleSchema.optional(),
    scopes: z.array(ScopeSchema).optional(),
    permissions: z.array(PermissionSchema),
  })
  .openapi("Me");

// ── Members and invitations ──────────────────────────────────────────────────────────────────────
export const Member = z
  .object({ userId: Uuid, email: z.string(), name: z.string(), role: RoleSchema, joinedAt: IsoDate })
  .openapi("Member");
export const MemberList = z.object({ items: z.array(Member) }).openapi("MemberList");
export const MemberRoleBody = z.object({ role: RoleSchema }).openapi("MemberRoleBody");
export const UserIdParams = z.object({ userId: Uuid.openapi({ param: { name: "userId", in: "path" } }) });

export const InvitationCreateBody = z.object({ email: EmailSchema, role: RoleSchema }).openapi("InvitationCreateBody");
export const Invitation = z
  .object({ id: Uuid, email: z.string(), role: RoleSchema, expiresAt: IsoDate, createdAt: IsoDate })
  .openapi("Invitation");
export const InvitationList = z.object({ items: z.array(Invitation) }).openapi("InvitationList");

// ── API keys ─────────────────────────────────────────────────────────────────────────────────────
export const ApiKey = z
  .object({
    id: z.string().openapi({ description: "Non-secret key id, also part of the secret.", example: "Kx7Qm2Pa9Lw3" }),
    name: z.string(),
    prefix: z.string().openapi({ description: "Non-secret display part of the secret.", example: "rsk_Kx7Qm2Pa9Lw3" }),
    scopes: z.array(ScopeSchema),
    createdAt: IsoDate,
    expiresAt: IsoDate.nullable(),
    lastUsedAt: IsoDate.nullable(),
    revokedAt: IsoDate.nullable(),
    rotatedAt: IsoDate.nullable(),
    graceUntil: IsoDate.nullable().openapi({ description: "Until then the secret before the last rotation still works." }),
  })
  .openapi("ApiKey");
export const ApiKeyList = z.object({ items: z.array(ApiKey) }).openapi("ApiKeyList");
export const ApiKeyCreateBody = z
  .object({
    name: z.string().trim().min(1).max(100),
    scopes: z.array(ScopeSchema).min(1, { message: "needs at least one scope" }),
    expiresAt: IsoDate.optional(),
  })
  .openapi("ApiKeyCreateBody");
export const ApiKeyWithSecret = z
  .object({ key: ApiKey, secret: z.string().openapi({ description: "Shown once; store it now." }) })
  .openapi("ApiKeyWithSecret");
export const MAX_GRACE_HOURS = 24 * 30;
export const ApiKeyRotateBody = z
  .object({ graceHours: z.number().min(0).max(MAX_GRACE_HOURS).optional().openapi({ description: "Default 24." }) })
  .openapi("ApiKeyRotateBody");
export const ApiKeyEnvelope = z.object({ key: ApiKey }).openapi("ApiKeyEnvelope");
export const KeyIdParams = z.object({
  id: z.string().regex(/^[A-Za-z0-9]{1,64}$/).openapi({ param: { name: "id", in: "path" } }),
});

// ── Audit ────────────────────────────────────────────────────────────────────────────────────────
export const AuditActor = z
  .object({ kind: z.enum(["user", "api_key", "system", "anonymous"]), id: z.string().nullable(), label: z.string() })
  .openapi("AuditActor");
export const AuditEvent = z
  .object({
    id: z.string(),
    at: IsoDate,
    action: z.string(),
    actor: AuditActor,
    target: z.string().nullable(),
    ip: z.string().nullable(),
    details: z.record(z.string(), z.unknown()),
  })
  .openapi("AuditEvent");
export const AuditList = z.object({ items: z.array(AuditEvent), nextCursor: z.string().nullable() }).openapi("AuditList");
export const AUDIT_PAGE_MAX = 200;
export const AuditQuery = z.object({
  limit: z.coerce.number().int().min(1).max(AUDIT_PAGE_MAX).default(50),
  cursor: z.string().regex(/^\d{1,18}$/, { message: "must be a nextCursor value from a previous page" }).optional(),
  action: z.string().max(100).optional(),
  actor: z.string().max(254).optional().openapi({ description: "Actor id or label (e-mail, key prefix)." }),
  from: IsoDate.optional(),
  to: IsoDate.optional(),
});
export const AuditVerify = z
  .object({ ok: z.boolean(), checked: z.number().int(), firstBadId: z.string().optional() })
  .openapi("AuditVerify");

// ── Dev mail ─────────────────────────────────────────────────────────────────────────────────────
export const DevMail = z
  .object({ id: z.string(), to: z.array(z.string()), subject: z.string(), text: z.string(), html: z.string(), receivedAt: IsoDate })
  .openapi("DevMail");
export const DevMailList = z.object({ items: z.array(DevMail) }).openapi("DevMailList");

// ── Platform ─────────────────────────────────────────────────────────────────────────────────────
export const Health = z
  .object({
    status: z.enum(["ok", "degraded"]),
    database: z.object({ ok: z.boolean() }),
    queue: z.object({ ok: z.boolean() }),
  })
  .openapi("Health");

export const Problem = z
  .object({
    type: z.string().openapi({ description: "Absolute URI of the problem type, documented at /docs." }),
    title: z.string(),
    status: z.number().int(),
    detail: z.string().optional(),
    instance: z.string().optional(),
    request_id: z.string(),
    errors: z.array(z.object({ pointer: z.string(), detail: z.string() })).optional(),
  })
  .openapi("Problem");

export type SignInInput = z.infer<typeof SignInBody>;
export type MeBody = z.infer<typeof MeResponse>;
export type MemberBody = z.infer<typeof Member>;
export type InvitationBody = z.infer<typeof Invitation>;
export type ApiKeyBody = z.infer<typeof ApiKey>;
export type ApiKeyCreateInput = z.infer<typeof ApiKeyCreateBody>;
export type AuditEventBody = z.infer<typeof AuditEvent>;
export type AuditQueryInput = z.infer<typeof AuditQuery>;
export type DevMailBody = z.infer<typeof DevMail>;
export type ProblemBody = z.infer<typeof Problem>;
