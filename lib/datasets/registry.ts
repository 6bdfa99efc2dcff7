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
 *  back (`created: false`). The staged file is always consumed. The bytes are stored first, with no lock held
 *  (an upload to a remote store may take long); the row is then inserted under the content key's lock (see
 *  withContentLock) only if the object is still there: a delete of another row holding the same bytes may
 *  have removed it in between, and the upload is then refused (409) with nothing recorded, to be sent again. */
export async function acceptDataset(
  db: Db, store: ObjectStore, clock: Clock, acting: Acting, staged: StagedFile, d: NewDataset,
): Promise<{ dataset: DatasetRow; created: boolean }> {
  const existing = await findByHash(db, acting.orgId, staged.sha256);
  if (existing) {
    await discardStaged(staged);
    return { dataset: existing, created: false };
  }
  const stored = await storeStaged(store, staged, DATASET_KIND, { contentType: d.mediaType });
  try {
    return await withContentLock(db, stored.key, async (tx) => {
      if (!(await store.exists(stored.key))) {
        throw new ApiError("conflict", "The same bytes were being deleted from another dataset while this upload stored them; send the upload again.");
      }
      const [row] = await tx.insert(datasets).values({
        orgId: acting.orgId, name: d.name, format: d.format, mediaType: d.mediaType, sha256: staged.sha256,
        sizeBytes: staged.size, storageKey: stored.key, metadata: d.metadata, createdBy: acting.actor,
        createdAt: clock.now(), // millisecond precision, as the cursor carries it
      }).onConflictDoNothing().returning();
      if (!row) {
        // a concurrent upload of the same bytes by this organisation won the insert
        return { dataset: (await findByHash(tx, acting.orgId, staged.sha256))!, created: false };
      }
      await appendAudit(tx, {
        orgId: acting.orgId, action: "dataset.create", actor: acting.actor, target: `dataset:${row.id}`, ip: acting.ip,
        details: { name: row.name, format: row.format, sha256: row.sha256, sizeBytes: row.sizeBytes },
      }, clock);
      return { dataset: row, created: true };
    });
  } catch (e) {
    // the transaction rolled back: an object this call stored and no row uses goes too (a failure of that
    // clean-up leaves an unused object behind, and must not hide the error that matters)
    if (!stored.reused) await withContentLock(db, stored.key, (tx) => removeObjectIfUnused(tx, store, stored.key)).catch(() => undefined);
    throw e;
  }
}

/** The kind under which dataset bytes are stored (lib/storage/keys.ts contentKey). */
const DATASET_KIND = "datasets";

/**
 * Runs `work` in a transaction holding an advisory lock on one object key (common practice: Postgres
 * pg_advisory_xact_lock on a hash of the key, released at commit or rollback). The check "no row uses this
 * object" before removing it, and the check "the object is there" before a row starts using it, both run
 * under it, so neither can act on a state the other is changing.
 */
async function withContentLock<T>(db: Db, key: string, work: (tx: Db) => Promise<T>): Promise<T> {
  return db.transaction(async (tx) => {
    await tx.execute(sql`SELECT pg_advisory_xact_lock(hashtextextended(${"object:" + key}, 0))`);
    return work(tx);
  });
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

/** Refused (409) while a queued or running job reads the dataset; finished jobs keep their results. The row and
 *  its audit entry go in one transaction; then, under the content key's lock, the object if no row uses it
 *  (after the commit: an object store cannot roll back). */
export async function deleteDataset(db: Db, store: ObjectStore, clock: Clock, acting: Acting, id: string): Promise<void> {
  const row = await getDataset(db, acting.orgId, id);
  await db.transaction(async (tx) => {
    const [busy] = await tx.select({ id: jobs.id }).from(jobs)
      .where(and(eq(jobs.datasetId, id), inArray(jobs.status, ["queued", "running"]))).limit(1).for("update");
    if (busy) throw new ApiError("conflict", `Job ${busy.id} is using this dataset; cancel it or wait for it to finish.`);
    const deleted = await tx.delete(datasets).where(eq(datasets.id, id)).returning();
    if (deleted.length === 0) throw new ApiError("not-found", `No dataset ${id}.`);
    await appendAudit(tx, {
      orgId: acting.orgId, action: "dataset.delete", actor: acting.actor, target: `dataset:${id}`, ip: acting.ip,
      details: { name: row.name, sha256: row.sha256 },
    }, clock);
  });
  await withContentLock(db, row.storageKey, (tx) => removeObjectIfUnused(tx, store, row.storageKey));
}
