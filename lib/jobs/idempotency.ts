// Idempotency-Key (draft-ietf-httpapi-idempotency-key-header-06): the first request with a key runs and its
// response is stored; a repeat with the same fingerprint replays it, with another fingerprint is refused (422),
// and one that arrives while the first is still running is refused (409). Scope: organisation + caller (API key
// or user). Records are kept IDEMPOTENCY_RETENTION_HOURS (lib/jobs/idempotency-key.ts); afterwards the key may be used afresh.
import { and, eq, lt } from "drizzle-orm";
import type { Db } from "@/db/client";
import { idempotencyKeys } from "@/db/schema";
import { ApiError } from "@/lib/api/problem";
import type { Clock } from "@/lib/auth/clock";
import { canonicalJson, sha256Hex } from "@/lib/jobs/canonical-json";
import { IDEMPOTENCY_RETENTION_HOURS } from "@/lib/jobs/idempotency-key";

export interface StoredResponse {
  status: number;
  body: unknown;
  headers: Record<string, string>;
}

export interface IdempotencyScope {
  orgId: string;
  principal: string;
  key: string;
}

export const fingerprintOf = (method: string, path: string, body: unknown) => sha256Hex(canonicalJson({ method, path, body }));

/** Runs `produce` once per key; thrown errors release the key (nothing happened, so a retry may run again). */
export async function idempotent(
  db: Db, clock: Clock, scope: IdempotencyScope, fingerprint: string, produce: () => Promise<StoredResponse>,
): Promise<{ response: StoredResponse; replayed: boolean }> {
  const now = clock.now();
  const where = and(eq(idempotencyKeys.orgId, scope.orgId), eq(idempotencyKeys.principal, scope.principal), eq(idempotencyKeys.key, scope.key));
  await db.delete(idempotencyKeys).where(and(where, lt(idempotencyKeys.expiresAt, now)));
  const [mine] = await db.insert(idempotencyKeys).values({
    ...scope, fingerprint, createdAt: now, expiresAt: new Date(now.getTime() + IDEMPOTENCY_RETENTION_HOURS * 3600_000),
  }).onConflictDoNothing().returning();
  if (!mine) {
    const [first] = await db.select().from(idempotencyKeys).where(where);
    if (!first) throw new ApiError("conflict", "The Idempotency-Key was released meanwhile; send the request again.");
    if (first.responseStatus === null) throw new ApiError("conflict", "A request with this Idempotency-Key is still being processed.");
    if (first.fingerprint !== fingerprint) {
      throw new ApiError("validation", "This Idempotency-Key was used with a different request.", { errors: [{ pointer: "", detail: "Idempotency-Key reused with another body" }] });
    }
    return { response: { status: first.responseStatus, body: first.responseBody, headers: first.responseHeaders ?? {} }, replayed: true };
  }
  let response: StoredResponse;
  try {
    response = await produce();
  } catch (e) {
    await db.delete(idempotencyKeys).where(where);
    throw e;
  }
  await db.update(idempotencyKeys).set({ responseStatus: response.status, responseBody: response.body, responseHeaders: response.headers }).where(where);
  return { response, replayed: false };
}

/** Drops records past their retention (the worker calls this hourly; a lookup also drops its own expired key). */
export async function purgeExpiredIdempotencyKeys(db: Db, clock: Clock): Promise<number> {
  return (await db.delete(idempotencyKeys).where(lt(idempotencyKeys.expiresAt, clock.now())).returning({ key: idempotencyKeys.key })).length;
}
