// The application's database handle: one pg pool as the app role (no UPDATE/DELETE on audit rows),
// Drizzle with snake_case column mapping.
import "server-only";
import { drizzle, type NodePgQueryResultHKT } from "drizzle-orm/node-postgres";
import type { PgDatabase } from "drizzle-orm/pg-core";
import pg from "pg";
import { env } from "@/lib/env";
import * as schema from "@/db/schema";

/** A database handle or an open transaction: services accept either, so callers can compose them atomically. */
export type Db = PgDatabase<NodePgQueryResultHKT, typeof schema>;

/** `logQuery` sees every statement Drizzle sends (tests count queries with it). */
export const makeDb = (pool: pg.Pool, logQuery?: (sql: string) => void): Db =>
  drizzle(pool, { schema, casing: "snake_case", ...(logQuery ? { logger: { logQuery } } : {}) });

// Next can evaluate this module more than once per process (route bundles); keep one pool per process.
const holder = globalThis as unknown as { __rillscaleDb?: { pool: pg.Pool; db: Db } };

export function db(): Db {
  if (!holder.__rillscaleDb) {
    const pool = new pg.Pool({ connectionString: env().DATABASE_URL, max: 10 });
    pool.on("error", (e) => console.error("database pool error:", e.message));
    holder.__rillscaleDb = { pool, db: makeDb(pool) };
  }
  return holder.__rillscaleDb.db;
}

/**
 * A statement built once per handle and then run as a named prepared statement (PostgreSQL 15 manual, PREPARE):
 * the statements of every API request (the API key, the job, the rate-limit count) skip Drizzle's query building and the server's
 * parse and plan after the first run on each connection. Keyed by handle, so a transaction gets its own.
 */
export function preparedFor<Q>(db: Db, name: string, build: (db: Db) => Q): Q {
  let byName = preparedByHandle.get(db);
  if (!byName) preparedByHandle.set(db, (byName = new Map()));
  let q = byName.get(name) as Q | undefined;
  if (q === undefined) byName.set(name, (q = build(db)));
  return q;
}
const preparedByHandle = new WeakMap<Db, Map<string, unknown>>();

export function pool(): pg.Pool {
  db();
  return holder.__rillscaleDb!.pool;
}
