// Writing and reading the append-only audit log (named queries; handlers never write SQL for it).
import { and, asc, desc, eq, gte, isNull, lt, lte, or, sql, type SQL } from "drizzle-orm";
import type { Db } from "@/db/client";
import { auditEvents, type AuditEventRow } from "@/db/schema";
import { GENESIS_HASH, eventHash, verifyChain, type ChainedFields } from "@/lib/audit/chain";
import type { Clock } from "@/lib/auth/clock";

export type AuditActorKind = "user" | "api_key" | "system" | "anonymous";

export interface AuditInput {
  orgId: string | null;
  action: string;
  actor: { kind: AuditActorKind; id: string | null; label: string };
  target?: string | null;
  ip?: string | null;
  details?: Record<string, unknown>;
}

const orgIs = (orgId: string | null) => (orgId ? eq(auditEvents.orgId, orgId) : isNull(auditEvents.orgId));

/** Appends under a per-organisation advisory lock so concurrent writers cannot fork the chain. */
export async function appendAudit(db: Db, input: AuditInput, clock: Clock): Promise<AuditEventRow> {
  return db.transaction(async (tx) => {
    await tx.execute(sql`SELECT pg_advisory_xact_lock(hashtextextended(${"audit:" + (input.orgId ?? "none")}, 0))`);
    const [last] = await tx
      .select({ hash: auditEvents.hash })
      .from(auditEvents)
      .where(orgIs(input.orgId))
      .orderBy(desc(auditEvents.id))
      .limit(1);
    const fields: ChainedFields = {
      orgId: input.orgId,
      at: clock.now(),
      action: input.action,
      actorKind: input.actor.kind,
      actorId: input.actor.id,
      actorLabel: input.actor.label,
      target: input.target ?? null,
      ip: input.ip ?? null,
      details: input.details ?? {},
    };
    const prevHash = last?.hash ?? GENESIS_HASH;
    const [row] = await tx.insert(auditEvents).values({ ...fields, prevHash, hash: eventHash(prevHash, fields) }).returning();
    return row;
  });
}

export interface AuditFilter {
  limit: number;
  cursor?: string;
  action?: string;
  actor?: string;
  from?: Date;
  to?: Date;
}

/** Newest first; the cursor is the id of the last row of the previous page. */
export async function listAudit(db: Db, orgId: string, f: AuditFilter): Promise<{ items: AuditEventRow[]; nextCursor: string | null }> {
  const conds: SQL[] = [eq(auditEvents.orgId, orgId)];
  if (f.cursor !== undefined) conds.push(lt(auditEvents.id, Number(f.cursor)));
  if (f.action) conds.push(eq(auditEvents.action, f.action));
  if (f.actor) conds.push(or(eq(auditEvents.actorId, f.actor), eq(auditEvents.actorLabel, f.actor))!);
  if (f.from) conds.push(gte(auditEvents.at, f.from));
  if (f.to) conds.push(lte(auditEvents.at, f.to));
  const rows = await db.select().from(auditEvents).where(and(...conds)).orderBy(desc(auditEvents.id)).limit(f.limit + 1);
  const more = rows.length > f.limit;
  const items = more ? rows.slice(0, f.limit) : rows;
  return { items, nextCursor: more ? String(items[items.length - 1].id) : null };
}

export async function verifyOrgAudit(db: Db, orgId: string) {
  const rows = await db.select().from(auditEvents).where(eq(auditEvents.orgId, orgId)).orderBy(asc(auditEvents.id));
  return verifyChain(rows);
}
