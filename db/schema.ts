// Drizzle schema: one table per entity, camelCase fields mapped to snake_case columns (casing: "snake_case"
// in db/client.ts and drizzle.config.ts). Migrations in drizzle/ are generated from this file.
import { sql } from "drizzle-orm";
import {
  bigint, boolean, customType, doublePrecision, index, integer, jsonb, pgEnum, pgTable, primaryKey, real, text, timestamp, unique, uuid,
} from "drizzle-orm/pg-core";

const ts = () => timestamp({ withTimezone: true, mode: "date" });

export const memberRole = pgEnum("member_role", ["admin", "analyst", "auditor"]);

export const organisations = pgTable("organisations", {
  id: uuid().primaryKey().defaultRandom(),
  name: text().notNull(),
  slug: text().notNull().unique(),
  createdAt: ts().notNull().defaultNow(),
});

export const users = pgTable("users", {
  id: uuid().primaryKey().defaultRandom(),
  email: text().notNull().unique(), // stored lower-cased
  name: text().notNull(),
  passwordHash: text().notNull(),
  createdAt: ts().notNull().defaultNow(),
  passwordChangedAt: ts().notNull().defaultNow(),
});

export const memberships = pgTable(
  "memberships",
  {
    orgId: uuid().notNull().references(() => organisations.id, { onDelete: "cascade" }),
    userId: uuid().notNull().references(() => users.id, { onDelete: "cascade" }),
    role: memberRole().notNull(),
    joinedAt: ts().notNull().defaultNow(),
  },
  (t) => [primaryKey({ columns: [t.orgId, t.userId] }), index().on(t.userId)],
);

/** One row per signed-in browser; the cookie's JWT carries its id, so deleting/revoking the row signs it out. */
export const sessions = pgTable(
  "sessions",
  {
    id: uuid().primaryKey().defaultRandom(),
    userId: uuid().notNull().references(() => users.id, { onDelete: "cascade" }),
    orgId: uuid().notNull().references(() => organisations.id, { onDelete: "cascade" }),
    createdAt: ts().notNull().defaultNow(),
    expiresAt: ts().notNull(),
    revokedAt: ts(),
    ip: text(),
    userAgent: text(),
  },
  (t) => [index().on(t.userId)],
);

/** Only HMAC-SHA-256(pepper, secret) is stored; `previousSecretHash` keeps working until `graceUntil`. */
export const apiKeys = pgTable(
  "api_keys",
  {
    id: text().primaryKey(), // the non-secret key id embedded in the secret
    orgId: uuid().notNull().references(() => organisations.id, { onDelete: "cascade" }),
    name: text().notNull(),
    scopes: text().array().notNull(),
    secretHash: text().notNull(),
    previousSecretHash: text(),
    graceUntil: ts(),
    rotatedAt: ts(),
    createdBy: uuid().references(() => users.id, { onDelete: "set null" }),
    createdAt: ts().notNull().defaultNow(),
    expiresAt: ts(),
    lastUsedAt: ts(),
    revokedAt: ts(),
  },
  (t) => [index().on(t.orgId)],
);

export const invitations = pgTable(
  "invitations",
  {
    id: uuid().primaryKey().defaultRandom(),
    orgId: uuid().notNull().references(() => organisations.id, { onDelete: "cascade" }),
    email: text().notNull(),
    role: memberRole().notNull(),
    tokenHash: text().notNull().unique(),
    invitedBy: uuid().references(() => users.id, { onDelete: "set null" }),
    createdAt: ts().notNull().defaultNow(),
    expiresAt: ts().notNull(),
    acceptedAt: ts(),
  },
  (t) => [index().on(t.orgId)],
);

export const passwordResets = pgTable("password_resets", {
  id: uuid().primaryKey().defaultRandom(),
  userId: uuid().notNull().references(() => users.id, { onDelete: "cascade" }),
  tokenHash: text().notNull().unique(),
  createdAt: ts().notNull().defaultNow(),
  expiresAt: ts().notNull(),
  usedAt: ts(),
});

/** Failed sign-ins counted per bucket ("account:<email>" or "ip:<address>") inside a fixed window. */
export const loginThrottles = pgTable("login_throttles", {
  bucket: text().primaryKey(),
  failures: integer().notNull().default(0),
  windowStartedAt: ts().notNull().defaultNow(),
  lockedUntil: ts(),
});

/**
 * Append-only: the app role may only INSERT and SELECT, a trigger refuses UPDATE/DELETE/TRUNCATE
 * (drizzle/0001_*.sql), and each row's hash covers the previous row's hash of the same organisation.
 */
export const auditEvents = pgTable(
  "audit_events",
  {
    id: bigint({ mode: "number" }).primaryKey().generatedAlwaysAsIdentity(),
    orgId: uuid().references(() => organisations.id, { onDelete: "restrict" }),
    at: ts().notNull(),
    action: text().notNull(),
    actorKind: text().notNull(),
    actorId: text(),
    actorLabel: text().notNull(),
    target: text(),
    ip: text(),
    details: jsonb().$type<Record<string, unknown>>().notNull().default(sql`'{}'::jsonb`),
    prevHash: text().notNull(),
    hash: text().notNull(),
  },
  (t) => [index().on(t.orgId, t.id), index().on(t.orgId, t.action)],
);

export type Organisation = typeof organisations.$inferSelect;
export type User = typeof users.$inferSelect;
export type Membership = typeof memberships.$inferSelect;
export type Session = typeof sessions.$inferSelect;
export type ApiKeyRow = typeof apiKeys.$inferSelect;
export type InvitationRow = typeof invitations.$inferSelect;
export type PasswordReset = typeof passwordResets.$inferSelect;
export type LoginThrottle = typeof loginThrottles.$inferSelect;
export type AuditEventRow = typeof auditEvents.$inferSelect;
export type NewAuditEvent = typeof auditEvents.$inferInsert;

// ── Datasets, jobs and results (issue 6) ─────────────────────────────────────────────────────────
export const datasetFormat = pgEnum("dataset_format", ["geotiff", "geojson", "zip"]);
export const jobStatus = pgEnum("job_status", ["queued", "running", "succeeded", "failed", "cancelled"]);

/** An accepted upload: its bytes live in the object store under a content key; one row per (org, sha256). */
export const datasets = pgTable(
  "datasets",
  {
    id: uuid().primaryKey().defaultRandom(),
    orgId: uuid().notNull().references(() => organisations.id, { onDelete: "cascade" }),
    name: text().notNull(),
    format: datasetFormat().notNull(),
    mediaType: text().notNull(),
    sha256: text().notNull(),
    sizeBytes: bigint({ mode: "number" }).notNull(),
    storageKey: text().notNull(),
    /** What the sandboxed inspection read: CRS, lon/lat bbox, size, cell size, data type, nodata, counts. */
    metadata: jsonb().$type<Record<string, unknown>>().notNull(),
    createdBy: jsonb().$type<{ kind: string; id: string | null; label: string }>().notNull(),
    createdAt: ts().notNull().defaultNow(),
  },
  (t) => [unique().on(t.orgId, t.sha256), index().on(t.orgId, t.createdAt, t.id)],
);

/** Our record of each analysis (pg-boss only delivers it): status, stage, progress, timings and the error. */
export const jobs = pgTable(
  "jobs",
  {
    id: uuid().primaryKey().defaultRandom(),
    orgId: uuid().notNull().references(() => organisations.id, { onDelete: "cascade" }),
    datasetId: uuid().references(() => datasets.id, { onDelete: "set null" }), // kept when the dataset is deleted
    kind: text().notNull(),
    /** The parameters after the kind's schema applied its defaults (canonical JSON is hashed into cacheKey). */
    params: jsonb().$type<Record<string, unknown>>().notNull(),
    cacheKey: text().notNull(),
    status: jobStatus().notNull().default("queued"),
    stage: text(),
    progress: real().notNull().default(0),
    error: jsonb().$type<Record<string, unknown>>(),
    attempts: integer().notNull().default(0),
    /** Set when the result was reused from an earlier job with the same cache key. */
    cachedFromJobId: uuid(),
    submittedBy: jsonb().$type<{ kind: string; id: string | null; label: string }>().notNull(),
    workerId: text(),
    heartbeatAt: ts(),
    cancelRequestedAt: ts(),
    createdAt: ts().notNull().defaultNow(),
    startedAt: ts(),
    finishedAt: ts(),
    updatedAt: ts().notNull().defaultNow(),
  },
  (t) => [index().on(t.orgId, t.createdAt, t.id), index().on(t.orgId, t.status), index().on(t.datasetId), index().on(t.cacheKey)],
);

/** One row per succeeded job (upserted, so a retried job never leaves two). */
export const jobResults = pgTable("job_results", {
  jobId: uuid().primaryKey().references(() => jobs.id, { onDelete: "cascade" }),
  summary: jsonb().$type<Record<string, unknown>>().notNull(),
  timingsS: jsonb().$type<Record<string, number>>().notNull(),
  /** [{name, mediaType, size, sha256, key}]; keys may point at another job's objects when the result was reused. */
  artifacts: jsonb().$type<{ name: string; mediaType: string; size: number; sha256: string; key: string }[]>().notNull(),
  softwareVersion: text().notNull(),
  createdAt: ts().notNull().defaultNow(),
});

/** Idempotency-Key records (draft-ietf-httpapi-idempotency-key-header), scoped to org + caller. */
export const idempotencyKeys = pgTable(
  "idempotency_keys",
  {
    orgId: uuid().notNull().references(() => organisations.id, { onDelete: "cascade" }),
    principal: text().notNull(),
    key: text().notNull(),
    fingerprint: text().notNull(),
    responseStatus: integer(),
    responseBody: jsonb(),
    responseHeaders: jsonb().$type<Record<string, string>>(),
    createdAt: ts().notNull().defaultNow(),
    expiresAt: ts().notNull(),
  },
  (t) => [primaryKey({ columns: [t.orgId, t.principal, t.key] }), index().on(t.expiresAt)],
);

/** Fixed-window request counters per bucket ("key:<id>", "org:<id>", "user:<id>"). */
export const rateLimitCounters = pgTable("rate_limit_counters", {
  bucket: text().primaryKey(),
  windowStartedAt: ts().notNull(),
  count: integer().notNull().default(0),
});

// ── Stream networks for the feature service (issue 7) ────────────────────────────────────────────────
/** A PostGIS LineString in lon/lat (EPSG:4326); lib/features writes it with ST_GeomFromGeoJSON and reads ST_AsGeoJSON. */
const lineString4326 = customType<{ data: string; driverData: string }>({ dataType: () => "geometry(LineString,4326)" });

/** The stream links of a succeeded drainage or network job, one row per link; the GiST index serves bbox queries. */
export const networkFeatures = pgTable(
  "network_features",
  {
    jobId: uuid().notNull().references(() => jobs.id, { onDelete: "cascade" }),
    featureId: integer().notNull(), // the link id of the job's network artifact
    downstream: integer(),
    strahlerOrder: integer().notNull(),
    shreveMagnitude: doublePrecision().notNull(),
    lengthM: doublePrecision().notNull(),
    dropM: doublePrecision(),
    areaM2: doublePrecision("area_m2"),
    geom: lineString4326().notNull(),
  },
  (t) => [primaryKey({ columns: [t.jobId, t.featureId] }), index().using("gist", t.geom), index().on(t.jobId, t.strahlerOrder)],
);

export type DatasetRow = typeof datasets.$inferSelect;
export type JobRow = typeof jobs.$inferSelect;
export type JobResultRow = typeof jobResults.$inferSelect;
export type NetworkFeatureRow = typeof networkFeatures.$inferSelect;

// ── Provenance and webhooks (issue 7) ────────────────────────────────────────────────────────────
/** Ed25519 provenance signing keys. The private JWK is stored only sealed (AES-256-GCM under a key derived from
 *  the server pepper, lib/provenance/sealed-box.ts) and erased at retirement; public keys stay published. */
export const signingKeys = pgTable("signing_keys", {
  kid: text().primaryKey(), // RFC 7638 thumbprint
  publicJwk: jsonb().$type<Record<string, unknown>>().notNull(),
  sealedPrivateJwk: text(),
  createdAt: ts().notNull().defaultNow(),
  retiredAt: ts(),
});

/** The signed PROV-JSON of a succeeded job: the document exactly as signed and its detached JWS. */
export const jobProvenance = pgTable("job_provenance", {
  jobId: uuid().primaryKey().references(() => jobs.id, { onDelete: "cascade" }),
  orgId: uuid().notNull().references(() => organisations.id, { onDelete: "cascade" }),
  document: text().notNull(),
  documentSha256: text().notNull(),
  jws: text().notNull(),
  kid: text().notNull().references(() => signingKeys.kid),
  createdAt: ts().notNull().defaultNow(),
});

/** Marks a finished job as followed up (provenance written, webhook deliveries queued) exactly once. */
export const jobFollowUps = pgTable("job_follow_ups", {
  jobId: uuid().primaryKey().references(() => jobs.id, { onDelete: "cascade" }),
  status: jobStatus().notNull(),
  doneAt: ts().notNull().defaultNow(),
});

/** A receiver an org admin registered; secrets are sealed, the previous one signs too until previousUntil. */
export const webhookEndpoints = pgTable(
  "webhook_endpoints",
  {
    id: uuid().primaryKey().defaultRandom(),
    orgId: uuid().notNull().references(() => organisations.id, { onDelete: "cascade" }),
    url: text().notNull(),
    description: text().notNull().default(""),
    events: text().array().notNull(),
    sealedSecret: text().notNull(),
    sealedPreviousSecret: text(),
    previousUntil: ts(),
    enabled: boolean().notNull().default(true),
    disabledReason: text(),
    createdAt: ts().notNull().defaultNow(),
    updatedAt: ts().notNull().defaultNow(),
  },
  (t) => [index().on(t.orgId)],
);

/** One message to one endpoint; its id is the stable `webhook-id` of every attempt. */
export const webhookDeliveries = pgTable(
  "webhook_deliveries",
  {
    id: text().primaryKey(), // msg_<uuid>
    endpointId: uuid().notNull().references(() => webhookEndpoints.id, { onDelete: "cascade" }),
    orgId: uuid().notNull().references(() => organisations.id, { onDelete: "cascade" }),
    event: text().notNull(),
    jobId: uuid(),
    payload: text().notNull(),
    state: text().$type<"pending" | "delivered" | "failed">().notNull().default("pending"),
    attempts: integer().notNull().default(0),
    nextAttemptAt: ts(),
    lastStatus: integer(),
    lastError: text(),
    createdAt: ts().notNull().defaultNow(),
    deliveredAt: ts(),
  },
  (t) => [index().on(t.state, t.nextAttemptAt), index().on(t.endpointId, t.createdAt)],
);

export const webhookAttempts = pgTable(
  "webhook_attempts",
  {
    id: bigint({ mode: "number" }).primaryKey().generatedAlwaysAsIdentity(),
    deliveryId: text().notNull().references(() => webhookDeliveries.id, { onDelete: "cascade" }),
    attempt: integer().notNull(),
    at: ts().notNull(),
    status: integer(),
    durationMs: integer().notNull(),
    error: text(),
    responseExcerpt: text().notNull().default(""),
  },
  (t) => [index().on(t.deliveryId, t.attempt)],
);

export type SigningKeyRow = typeof signingKeys.$inferSelect;
export type JobProvenanceRow = typeof jobProvenance.$inferSelect;
export type WebhookEndpointRow = typeof webhookEndpoints.$inferSelect;
export type WebhookDeliveryRow = typeof webhookDeliveries.$inferSelect;
export type WebhookAttemptRow = typeof webhookAttempts.$inferSelect;
