// The feature service's queries: one collection per succeeded drainage or network job of the caller's
// organisation (another organisation's job is as unknown as a missing one), its links paged by feature id
// (keyset: a page never shifts) and filtered in the database by bbox (GiST index) and Strahler order.
import { and, asc, count, desc, eq, gt, inArray, or, sql, type SQL } from "drizzle-orm";
import type { Db } from "@/db/client";
import { jobs, networkFeatures, type JobRow } from "@/db/schema";
import { ApiError } from "@/lib/api/problem";
import type { ItemsQuery } from "@/lib/features/items-query";

/** Job kinds whose results carry a stream network artifact. */
export const NETWORK_KINDS = ["drainage", "network"] as const;
/** The /collections document lists this many newest jobs; older ones stay reachable by their id. */
export const MAX_LISTED_COLLECTIONS = 500;

const UUID = /^[0-9a-f]{8}-[0-9a-f]{4}-[0-9a-f]{4}-[0-9a-f]{4}-[0-9a-f]{12}$/i;

export interface NetworkCollection {
  job: JobRow;
  featureCount: number;
  /** [west, south, east, north] in CRS84; null while the job has no stored links. */
  bbox: [number, number, number, number] | null;
}

export interface NetworkFeatureRow {
  id: number;
  downstream: number | null;
  order: number;
  magnitude: number;
  lengthM: number;
  dropM: number | null;
  areaM2: number | null;
  /** GeoJSON geometry text from ST_AsGeoJSON, 7 decimals (about 1 cm, as the artifacts are written). */
  geometry: string;
}

/** A result reused from the cache keeps its links under the job that computed them. */
const sourceOf = (job: JobRow) => job.cachedFromJobId ?? job.id;

async function statsOf(db: Db, sourceIds: string[]) {
  if (sourceIds.length === 0) return new Map<string, { n: number; bbox: NetworkCollection["bbox"] }>();
  const extent = sql`ST_Extent(${networkFeatures.geom})`;
  const rows = await db.select({
    jobId: networkFeatures.jobId, n: count(),
    west: sql<number>`ST_XMin(${extent})`, south: sql<number>`ST_YMin(${extent})`, east: sql<number>`ST_XMax(${extent})`, north: sql<number>`ST_YMax(${extent})`,
  }).from(networkFeatures).where(inArray(networkFeatures.jobId, sourceIds)).groupBy(networkFeatures.jobId);
  return new Map(rows.map((r) => [r.jobId, { n: r.n, bbox: [r.west, r.south, r.east, r.north] as [number, number, number, number] }]));
}

const withStats = async (db: Db, list: JobRow[]): Promise<NetworkCollection[]> => {
  const stats = await statsOf(db, [...new Set(list.map(sourceOf))]);
  return list.map((job) => ({ job, featureCount: stats.get(sourceOf(job))?.n ?? 0, bbox: stats.get(sourceOf(job))?.bbox ?? null }));
};

const networkJobs = (orgId: string) => and(eq(jobs.orgId, orgId), eq(jobs.status, "succeeded"), inArray(jobs.kind, [...NETWORK_KINDS]));

export async function listNetworkCollections(db: Db, orgId: string): Promise<NetworkCollection[]> {
  const list = await db.select().from(jobs).where(networkJobs(orgId)).orderBy(desc(jobs.createdAt), desc(jobs.id)).limit(MAX_LISTED_COLLECTIONS);
  return withStats(db, list);
}

export async function getNetworkCollection(db: Db, orgId: string, collectionId: string): Promise<NetworkCollection> {
  const [job] = UUID.test(collectionId) ? await db.select().from(jobs).where(and(networkJobs(orgId), eq(jobs.id, collectionId))) : [];
  if (!job) throw new ApiError("not-found", `No collection ${collectionId}: collections are the succeeded drainage and network jobs of your organisation.`);
  return (await withStats(db, [job]))[0];
}

const columns = {
  id: networkFeatures.featureId, downstream: networkFeatures.downstream, order: networkFeatures.strahlerOrder,
  magnitude: networkFeatures.shreveMagnitude, lengthM: networkFeatures.lengthM, dropM: networkFeatures.dropM, areaM2: networkFeatures.areaM2,
  geometry: sql<string>`ST_AsGeoJSON(${networkFeatures.geom}, 7)`,
};

function filters(c: NetworkCollection, q: ItemsQuery): SQL[] {
  const conds: SQL[] = [eq(networkFeatures.jobId, sourceOf(c.job))];
  if (q.order !== null) conds.push(eq(networkFeatures.strahlerOrder, q.order));
  if (q.envelopes) {
    conds.push(or(...q.envelopes.map((e) => sql`ST_Intersects(${networkFeatures.geom}, ST_MakeEnvelope(${e.west}, ${e.south}, ${e.east}, ${e.north}, 4326))`))!);
  }
  return conds;
}

/** One page of links in feature-id order, how many match in all, and the id to continue after (null: last page). */
export async function queryNetworkItems(db: Db, c: NetworkCollection, q: ItemsQuery) {
  const conds = filters(c, q);
  const page = q.after === null ? conds : [...conds, gt(networkFeatures.featureId, q.after)];
  const [rows, [{ n }]] = await Promise.all([
    db.select(columns).from(networkFeatures).where(and(...page)).orderBy(asc(networkFeatures.featureId)).limit(q.limit + 1),
    db.select({ n: count() }).from(networkFeatures).where(and(...conds)),
  ]);
  const features: NetworkFeatureRow[] = rows.slice(0, q.limit);
  return { features, numberMatched: n, nextAfter: rows.length > q.limit ? features[features.length - 1].id : null };
}

export async function getNetworkItem(db: Db, c: NetworkCollection, featureId: string): Promise<NetworkFeatureRow> {
  const id = /^\d{1,9}$/.test(featureId) ? Number(featureId) : null;
  const [row] = id === null ? [] : await db.select(columns).from(networkFeatures)
    .where(and(eq(networkFeatures.jobId, sourceOf(c.job)), eq(networkFeatures.featureId, id)));
  if (!row) throw new ApiError("not-found", `No feature ${featureId} in collection ${c.job.id}.`);
  return row;
}
