// Stream links of a finished job's network artifact (drainage `streams.geojson`, network `network.geojson`)
// copied into PostGIS, so the feature service answers bbox queries from the GiST index instead of the file.
import { eq, sql } from "drizzle-orm";
import type { Db } from "@/db/client";
import { networkFeatures } from "@/db/schema";

/** Rows per INSERT: 9 parameters a row stays far below PostgreSQL's 65 535 bind parameters. */
const ROWS_PER_INSERT = 2_000;

type Position = [number, number];

interface LinkFeature {
  id?: unknown;
  geometry?: { type?: unknown; coordinates?: unknown } | null;
  properties?: Record<string, unknown> | null;
}

const finiteOrNull = (v: unknown) => (typeof v === "number" && Number.isFinite(v) ? v : null);
const intOrNull = (v: unknown) => (Number.isInteger(v) && (v as number) >= 0 ? (v as number) : null);

/** The two artifacts name the same quantities differently (drainage: order/magnitude; network: strahler/shreve). */
function rowOf(jobId: string, f: LinkFeature, at: number) {
  const p = f.properties ?? {};
  const coords = f.geometry?.type === "LineString" ? (f.geometry.coordinates as Position[]) : null;
  const id = intOrNull(f.id ?? p.id ?? p.link);
  const order = intOrNull(p.order ?? p.strahler);
  if (!coords || coords.length === 0 || id === null || order === null) {
    throw new TypeError(`network feature ${at} is not a stream link (LineString with an integer id and a Strahler order)`);
  }
  // a link of one vertex (one cell) is still a LineString: PostGIS needs two positions
  const coordinates = coords.length === 1 ? [coords[0], coords[0]] : coords;
  return {
    jobId, featureId: id, downstream: intOrNull(p.downstream), strahlerOrder: order,
    shreveMagnitude: finiteOrNull(p.magnitude ?? p.shreve) ?? 0, lengthM: finiteOrNull(p.lengthM) ?? 0,
    dropM: finiteOrNull(p.dropM), areaM2: finiteOrNull(p.areaM2),
    geom: sql`ST_SetSRID(ST_GeomFromGeoJSON(${JSON.stringify({ type: "LineString", coordinates })}), 4326)`,
  };
}

/**
 * Replaces the stored links of `jobId` by the features of `geojson` (an RFC 7946 FeatureCollection of
 * LineStrings in lon/lat). Idempotent, so a retried job stores its links once. Pass a transaction to make it
 * part of the job's completion. Returns the number of links stored.
 */
export async function storeNetworkFeatures(db: Db, jobId: string, geojson: unknown): Promise<number> {
  const features = (geojson as { type?: unknown; features?: unknown })?.features;
  if ((geojson as { type?: unknown })?.type !== "FeatureCollection" || !Array.isArray(features)) {
    throw new TypeError("the network artifact is not a GeoJSON FeatureCollection");
  }
  const rows = (features as LinkFeature[]).map((f, i) => rowOf(jobId, f, i));
  await db.delete(networkFeatures).where(eq(networkFeatures.jobId, jobId));
  for (let i = 0; i < rows.length; i += ROWS_PER_INSERT) {
    await db.insert(networkFeatures).values(rows.slice(i, i + ROWS_PER_INSERT));
  }
  return rows.length;
}
