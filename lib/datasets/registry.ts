// The dataset registry: accepting an inspected upload (stored under its content key, one row per organisation
// and hash), listing with a keyset cursor, reading and deleting. Named queries; route handlers hold no SQL.
import { and, desc, eq, gte, inArray, lt, lte, or, sql, type SQL } from "drizzle-orm";
import type { Db } from "@/db/client";
import { datasets, jobs, type DatasetRow } from "@/db/schema";
import { ApiError } from "@/lib/api/problem";
import { appendAudit, type AuditInput } from "@/lib/audit/log";
import type { Clock } from "@/lib/auth/clock";
import { discardStaged, storeStaged, type StagedFile } from "@/lib/ingest/stream-to-store";
import type { DatasetFormat } from "@/lib/jobs/kinds";
import type { ObjectStore } from "@/lib/storage";
import { decodeCursor, encodeCursor } from "@/lib/jobs/cursor";

export interface Acting {
  orgId: string;
  actor: AuditInput["actor"];
  ip: string | null;
}

export interface NewDataset {
  name: string;
  format: DatasetFormat;
  mediaType: string;
  metadata: Record<string, unknown>;
}

/** Stores the staged bytes and records the dataset; the same bytes already held by the org give its dataset
 *  back (`created: false`). The staged file is always consumed. */
export async function acceptDataset(
  db: Db, store: ObjectStore, clock: Clock, acting: Acting, staged: StagedFile, d: NewDataset,
): Promise<{ dataset: DatasetRow; created: boolean }> {
  const existing = await findByHash(db, acting.orgId, staged.sha256);
  if (existing) {
    await discardStaged(staged);
    return { dataset: existing, created: false };
  }
  const stored = await storeStaged(store, staged, "datasets", { contentType: d.mediaType });
  try {
    const [row] = await db.insert(datasets).values({
      orgId: acting.orgId, name: d.name, format: d.format, mediaType: d.mediaType, sha256: staged.sha256,
      sizeBytes: staged.size, storageKey: stored.key, metadata: d.metadata, createdBy: acting.actor,
      createdAt: clock.now(), // millisecond precision, as the cursor carries it
    }).onConflictDoNothing().returning();
    if (!row) {
      // a concurrent upload of the same bytes won the insert
      return { dataset: (await findByHash(db, acting.orgId, staged.sha256))!, created: false };
    }
    await appendAudit(db, {
      orgId: acting.orgId, action: "dataset.create", actor: acting.actor, target: `dataset:${row.id}`, ip: acting.ip,
      details: { name: row.name, format: row.format, sha256: row.sha256, sizeBytes: row.sizeBytes },
    }, clock);
    return { dataset: row, created: true };
  } catch (e) {
    if (!stored.reused) await removeObjectIfUnused(db, store, stored.key);
    throw e;
  }
}

async function findByHash(db: Db, orgId: string, sha256: string): Promise<DatasetRow | undefined> {
  const [row] = await db.select().from(datasets).where(and(eq(datasets.orgId, orgId), eq(datasets.sha256, sha256)));
  return row;
}

/** Another organisation may hold the same bytes under the same content key: remove the object only when no row uses it. */
async function removeObjectIfUnused(db: Db, store: ObjectStore, key: string): Promise<void> {
  const [{ n }] = await db.select({ n: sql<number>`count(*)::int` }).from(datasets).where(eq(datasets.storageKey, key));
  if (n === 0) await store.delete(key);
}

/** Another organisation's id answers exactly like an unknown one. */
export async function getDataset(db: Db, orgId: string, id: string): Promise<DatasetRow> {
  const [row] = await db.select().from(datasets).where(and(eq(datasets.orgId, orgId), eq(datasets.id, id)));
  if (!row) throw new ApiError("not-found", `No dataset ${id}.`);
  return row;
}

export interface DatasetFilter {
  limit: number;
  cursor?: string;
  format?: DatasetFormat;
  name?: string;
  sha256?: string;
  createdFrom?: Date;
  createdTo?: Date;
}

/** Newest first; the cursor encodes (createdAt, id) of the last row, so inserts never shift a page. */
export async function listDatasets(db: Db, orgId: string, f: DatasetFilter): Promise<{ items: DatasetRow[]; nextCursor: string | null }> {
  const conds: SQL[] = [eq(datasets.orgId, orgId)];
  if (f.format) conds.push(eq(datasets.format, f.format));
  if (f.name) conds.push(sql`${datasets.name} ILIKE ${"%" + f.name.replace(/[\\%_]/g, (c) => "\\" + c) + "%"}`);
  if (f.sha256) conds.push(eq(datasets.sha256, f.sha256));
  if (f.createdFrom) conds.push(gte(datasets.createdAt, f.createdFrom));
  if (f.createdTo) conds.push(lte(datasets.createdAt, f.createdTo));
  if (f.cursor) {
    const c = decodeCursor(f.cursor);
    conds.push(or(lt(datasets.createdAt, c.at), and(eq(datasets.createdAt, c.at), lt(datasets.id, c.id)))!);
  }
  const rows = await db.select().from(datasets).where(and(...conds)).orderBy(desc(datasets.createdAt), desc(datasets.id)).limit(f.limit + 1);
  const items = rows.slice(0, f.limit);
  return { items, nextCursor: rows.length > f.limit ? encodeCursor(items[items.length - 1].createdAt, items[items.length - 1].id) : null };
}

/** Refused (409) while a queued or running job reads the dataset; finished jobs keep their results. */
export async function deleteDataset(db: Db, store: ObjectStore, clock: Clock, acting: Acting, id: string): Promise<void> {
  const row = await getDataset(db, acting.orgId, id);
  const deleted = await db.transaction(async (tx) => {
    const [busy] = await tx.select({ id: jobs.id }).from(jobs)
      .where(and(eq(jobs.datasetId, id), inArray(jobs.status, ["queued", "running"]))).limit(1).for("update");
    if (busy) throw new ApiError("conflict", `Job ${busy.id} is using this dataset; cancel it or wait for it to finish.`);
    return tx.delete(datasets).where(eq(datasets.id, id)).returning();
  });
  if (deleted.length === 0) throw new ApiError("not-found", `No dataset ${id}.`);
  await removeObjectIfUnused(db, store, row.storageKey);
  await appendAudit(db, {
    orgId: acting.orgId, action: "dataset.delete", actor: acting.actor, target: `dataset:${id}`, ip: acting.ip,
    details: { name: row.name, sha256: row.sha256 },
  }, clock);
}
