// The provenance signing keys in the database: one active key (created on first use), rotation (admin action
// and the worker's schedule) that retires the old key — its public half stays in the JWK Set so documents it
// signed still verify, its sealed private half is erased — and the published JWK Set.
import { asc, desc, isNull } from "drizzle-orm";
import type { JSONWebKeySet, JWK } from "jose";
import type { Db } from "@/db/client";
import { signingKeys, type SigningKeyRow } from "@/db/schema";
import { generateSigningKey, openSigningKey } from "@/lib/provenance/signing-key";

async function insertKey(db: Db, serverSecret: string): Promise<SigningKeyRow> {
  const k = await generateSigningKey(serverSecret);
  const [row] = await db.insert(signingKeys).values({ kid: k.kid, publicJwk: k.publicJwk as Record<string, unknown>, sealedPrivateJwk: k.sealedPrivateJwk }).returning();
  return row;
}

/** The key to sign with now; the first call on a fresh database creates it. */
export async function activeSigningKey(db: Db, serverSecret: string) {
  const [row] = await db.select().from(signingKeys).where(isNull(signingKeys.retiredAt)).orderBy(desc(signingKeys.createdAt)).limit(1);
  const key = row ?? (await insertKey(db, serverSecret));
  return { kid: key.kid, createdAt: key.createdAt, privateKey: await openSigningKey(key.sealedPrivateJwk!, serverSecret) };
}

/** A new active key; every earlier one is retired (public half kept, private half erased). */
export async function rotateSigningKey(db: Db, serverSecret: string, now = new Date()): Promise<{ active: string; retired: string[] }> {
  const fresh = await generateSigningKey(serverSecret);
  return db.transaction(async (tx) => {
    const retired = await tx.update(signingKeys).set({ retiredAt: now, sealedPrivateJwk: null })
      .where(isNull(signingKeys.retiredAt)).returning({ kid: signingKeys.kid });
    await tx.insert(signingKeys).values({ kid: fresh.kid, publicJwk: fresh.publicJwk as Record<string, unknown>, sealedPrivateJwk: fresh.sealedPrivateJwk, createdAt: now });
    return { active: fresh.kid, retired: retired.map((r) => r.kid) };
  });
}

/** The schedule: rotate when the active key is older than maxAgeDays (or there is none). */
export async function rotateIfDue(db: Db, serverSecret: string, maxAgeDays: number, now = new Date()): Promise<string | null> {
  const [row] = await db.select().from(signingKeys).where(isNull(signingKeys.retiredAt)).orderBy(desc(signingKeys.createdAt)).limit(1);
  if (row && now.getTime() - row.createdAt.getTime() < maxAgeDays * 86_400_000) return null;
  return (await rotateSigningKey(db, serverSecret, now)).active;
}

/** RFC 7517 JWK Set of every key ever used, newest first (public members only). */
export async function publishedJwks(db: Db): Promise<JSONWebKeySet> {
  const rows = await db.select().from(signingKeys).orderBy(desc(signingKeys.createdAt), asc(signingKeys.kid));
  return { keys: rows.map((r) => r.publicJwk as JWK) };
}

export async function listSigningKeys(db: Db) {
  const rows = await db.select().from(signingKeys).orderBy(desc(signingKeys.createdAt));
  return rows.map((r) => ({ kid: r.kid, createdAt: r.createdAt.toISOString(), retiredAt: r.retiredAt?.toISOString() ?? null, active: r.retiredAt === null }));
}
