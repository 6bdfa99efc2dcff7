// API keys: our own format `rsk_<id>_<secret><check>` — a product prefix secret scanners can match, a non-secret
// id (12 base62), 22 base62 characters of secret (131 bits) and a CRC32 checksum (6 base62) of everything before it,
// checked before any database look-up. Only HMAC-SHA-256(pepper, key) is stored (STANDARDS.md, Keys and limits).
import { createHmac, randomBytes, timingSafeEqual } from "node:crypto";
import { crc32 } from "node:zlib";
import { and, desc, eq, isNull, lt, or, sql } from "drizzle-orm";
import { preparedFor, type Db } from "@/db/client";
import { apiKeys, organisations, type ApiKeyRow, type Organisation } from "@/db/schema";
import type { Scope } from "@/lib/auth/permissions";
import type { Clock } from "@/lib/auth/clock";

export const KEY_PREFIX = "rsk_";
const ID_CHARS = 12;
const SECRET_CHARS = 22; // 22 × log2(62) ≈ 131 bits ≥ 128
const CHECK_CHARS = 6; // 62^6 > 2^32 holds any CRC32
const BASE62 = "0123456789ABCDEFGHIJKLMNOPQRSTUVWXYZabcdefghijklmnopqrstuvwxyz";
const KEY_PATTERN = new RegExp(`^${KEY_PREFIX}([0-9A-Za-z]{${ID_CHARS}})_([0-9A-Za-z]{${SECRET_CHARS}})([0-9A-Za-z]{${CHECK_CHARS}})$`);

export const DEFAULT_GRACE_HOURS = 24;
// last_used_at is written at most once a minute per key, so a busy script does not turn every read into a write.
export const LAST_USED_RESOLUTION_MS = 60_000;

/** Uniform base62 characters: bytes ≥ 248 (= 4 × 62) are rejected so no character is favoured. */
function randomBase62(n: number): string {
  let out = "";
  while (out.length < n) {
    for (const b of randomBytes(n * 2)) {
      if (b < 248 && out.length < n) out += BASE62[b % 62];
    }
  }
  return out;
}

function base62Fixed(value: number, width: number): string {
  let s = "";
  for (let v = value; v > 0; v = Math.floor(v / 62)) s = BASE62[v % 62] + s;
  return s.padStart(width, "0");
}

const checksum = (body: string) => base62Fixed(crc32(body), CHECK_CHARS);

export function formatKey(id: string, secret: string): string {
  const body = `${KEY_PREFIX}${id}_${secret}`;
  return body + checksum(body);
}

export function newKeyId(): string {
  return randomBase62(ID_CHARS);
}

export function newKeySecret(id: string): string {
  return formatKey(id, randomBase62(SECRET_CHARS));
}

/** The key id when the string is shaped like our key and its checksum matches; null otherwise. No I/O. */
export function parseKey(token: string): { id: string } | null {
  const m = KEY_PATTERN.exec(token);
  if (!m) return null;
  const body = `${KEY_PREFIX}${m[1]}_${m[2]}`;
  return checksum(body) === m[3] ? { id: m[1] } : null;
}

export const displayPrefix = (id: string) => `${KEY_PREFIX}${id}`;

export function hashKey(pepper: string, token: string): string {
  return createHmac("sha256", pepper).update(token).digest("hex");
}

function sameHash(a: string, b: string | null): boolean {
  if (!b || a.length !== b.length) return false;
  return timingSafeEqual(Buffer.from(a, "hex"), Buffer.from(b, "hex"));
}

export type KeyRefusal = "malformed" | "unknown" | "revoked" | "expired" | "grace_over";

export type KeyCheck = { ok: true; key: ApiKeyRow; org: Organisation } | { ok: false; reason: KeyRefusal };

/** Verifies a presented key: checksum first (no query), then one look-up by id (with its organisation, in the
 *  same query) and a constant-time compare. Nothing is cached: a revoked key is refused on its next request. */
export async function authenticateApiKey(db: Db, pepper: string, token: string, clock: Clock): Promise<KeyCheck> {
  const parsed = parseKey(token);
  if (!parsed) return { ok: false, reason: "malformed" };
  const [found] = await preparedFor(db, "api_key_by_id", (d) => d.select({ key: apiKeys, org: organisations }).from(apiKeys)
    .innerJoin(organisations, eq(organisations.id, apiKeys.orgId)).where(eq(apiKeys.id, sql.placeholder("id"))).prepare("api_key_by_id"))
    .execute({ id: parsed.id });
  if (!found) return { ok: false, reason: "unknown" };
  const { key: row, org } = found;
  const now = clock.now();
  const hash = hashKey(pepper, token);
  const current = sameHash(hash, row.secretHash);
  const previous = !current && sameHash(hash, row.previousSecretHash);
  if (!current && !previous) return { ok: false, reason: "unknown" };
  if (row.revokedAt && row.revokedAt <= now) return { ok: false, reason: "revoked" };
  if (row.expiresAt && row.expiresAt <= now) return { ok: false, reason: "expired" };
  if (previous && !(row.graceUntil && row.graceUntil > now)) return { ok: false, reason: "grace_over" };
  if (!row.lastUsedAt || now.getTime() - row.lastUsedAt.getTime() >= LAST_USED_RESOLUTION_MS) {
    const stale = new Date(now.getTime() - LAST_USED_RESOLUTION_MS);
    // Asynchronous commit (PostgreSQL 15 manual §30.4; set_config(…, true) holds for this statement's own
    // transaction): the request does not wait for a WAL flush, and a crash within a fraction of a second may
    // lose this timestamp, which is only informational.
    await db
      .update(apiKeys)
      .set({ lastUsedAt: now })
      .where(and(
        eq(apiKeys.id, row.id), or(isNull(apiKeys.lastUsedAt), lt(apiKeys.lastUsedAt, stale)),
        sql`set_config('synchronous_commit', 'off', true) IS NOT NULL`,
      ));
    row.lastUsedAt = now;
  }
  return { ok: true, key: row, org };
}

export interface NewKey {
  orgId: string;
  name: string;
  scopes: Scope[];
  expiresAt?: Date | null;
  createdBy?: string | null;
}

export async function createApiKey(db: Db, pepper: string, input: NewKey, clock: Clock): Promise<{ key: ApiKeyRow; secret: string }> {
  const id = newKeyId();
  const secret = newKeySecret(id);
  const [key] = await db
    .insert(apiKeys)
    .values({
      id,
      orgId: input.orgId,
      name: input.name,
      scopes: input.scopes,
      secretHash: hashKey(pepper, secret),
      createdBy: input.createdBy ?? null,
      createdAt: clock.now(),
      expiresAt: input.expiresAt ?? null,
    })
    .returning();
  return { key, secret };
}

export async function findOrgKey(db: Db, orgId: string, id: string): Promise<ApiKeyRow | null> {
  const [row] = await db.select().from(apiKeys).where(and(eq(apiKeys.id, id), eq(apiKeys.orgId, orgId)));
  return row ?? null;
}

export async function listOrgKeys(db: Db, orgId: string): Promise<ApiKeyRow[]> {
  return db.select().from(apiKeys).where(eq(apiKeys.orgId, orgId)).orderBy(desc(apiKeys.createdAt));
}

/**
 * New secret under the same id; the secret it replaces keeps working until graceUntil. A secret older
 * than that (from an earlier rotation) stops working now.
 */
export async function rotateApiKey(
  db: Db, pepper: string, key: ApiKeyRow, graceHours: number, clock: Clock,
): Promise<{ key: ApiKeyRow; secret: string }> {
  const now = clock.now();
  const secret = newKeySecret(key.id);
  const [row] = await db
    .update(apiKeys)
    .set({
      secretHash: hashKey(pepper, secret),
      previousSecretHash: key.secretHash,
      graceUntil: new Date(now.getTime() + graceHours * 3_600_000),
      rotatedAt: now,
    })
    .where(eq(apiKeys.id, key.id))
    .returning();
  return { key: row, secret };
}

export async function revokeApiKey(db: Db, key: ApiKeyRow, clock: Clock): Promise<ApiKeyRow> {
  if (key.revokedAt) return key;
  const [row] = await db
    .update(apiKeys)
    .set({ revokedAt: clock.now(), graceUntil: null, previousSecretHash: null })
    .where(eq(apiKeys.id, key.id))
    .returning();
  return row;
}
