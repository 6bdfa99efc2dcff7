// Request limits of the dataset and job routes: a fixed one-minute window per caller (API key, or user for a
// session) and per organisation, counted in PostgreSQL so every web process shares the counts. Headers per
// draft-ietf-httpapi-ratelimit-headers-09: `RateLimit-Policy: "per-key";q=300;w=60, "per-org";q=3000;w=60` and
// `RateLimit: "per-key";r=<remaining>;t=<seconds to reset>` (the policy nearest its limit).
import { lt, sql } from "drizzle-orm";
import { preparedFor, type Db } from "@/db/client";
import { rateLimitCounters } from "@/db/schema";
import { ApiError } from "@/lib/api/problem";
import type { Clock } from "@/lib/auth/clock";
import { RATE_WINDOW_SECONDS } from "@/lib/jobs/config";

export interface RatePolicy {
  name: "per-key" | "per-org";
  bucket: string;
  quota: number;
}

/**
 * One statement counts the request in every bucket: a bucket's row starts at 1, or adds 1 within its window, or
 * restarts at 1 in a new window. Asynchronous commit (PostgreSQL 15 manual §30.4, set_config in §9.27.1): the count
 * is visible to every process at once, but its commit does not wait for the WAL flush, which was most of a request's
 * time at a few hundred a second; a crash may lose the last fraction of a second of counts, and a client then gets
 * those few requests again. set_config(…, true) holds for the statement's own transaction, and sits in the
 * conflict branch's WHERE, taken by every request after a bucket's first. Prepared once per policy count.
 */
function takeStatement(db: Db, buckets: number) {
  return db.insert(rateLimitCounters)
    .values(Array.from({ length: buckets }, (_, i) => ({ bucket: sql.placeholder(`bucket${i}`), windowStartedAt: sql.placeholder("started"), count: 1 })))
    .onConflictDoUpdate({
      target: rateLimitCounters.bucket,
      set: {
        count: sql`CASE WHEN ${rateLimitCounters.windowStartedAt} = excluded.window_started_at THEN ${rateLimitCounters.count} + 1 ELSE 1 END`,
        windowStartedAt: sql`excluded.window_started_at`,
      },
      setWhere: sql`set_config('synchronous_commit', 'off', true) IS NOT NULL`,
    })
    .returning({ bucket: rateLimitCounters.bucket, count: rateLimitCounters.count })
    .prepare(`rate_limit_take_${buckets}`);
}

/** Counts this request against each policy; throws 429 (with Retry-After) when one is over its quota. */
export async function takeRequest(db: Db, clock: Clock, policies: RatePolicy[]): Promise<Record<string, string>> {
  const nowMs = clock.now().getTime();
  const windowStart = new Date(Math.floor(nowMs / (RATE_WINDOW_SECONDS * 1000)) * RATE_WINDOW_SECONDS * 1000);
  const resetS = Math.max(1, Math.ceil((windowStart.getTime() + RATE_WINDOW_SECONDS * 1000 - nowMs) / 1000));
  const rows = await preparedFor(db, `rate_limit_take_${policies.length}`, (d) => takeStatement(d, policies.length)).execute({
    started: windowStart, ...Object.fromEntries(policies.map((p, i) => [`bucket${i}`, p.bucket])),
  });
  const used = new Map(rows.map((r) => [r.bucket, Number(r.count)]));
  const states = policies.map((p) => ({ p, remaining: Math.max(0, p.quota - (used.get(p.bucket) ?? 0)), over: (used.get(p.bucket) ?? 0) > p.quota }));
  const tightest = states.reduce((a, b) => (b.remaining / b.p.quota < a.remaining / a.p.quota ? b : a));
  const headers: Record<string, string> = {
    "ratelimit-policy": policies.map((p) => `"${p.name}";q=${p.quota};w=${RATE_WINDOW_SECONDS}`).join(", "),
    ratelimit: `"${tightest.p.name}";r=${tightest.remaining};t=${resetS}`,
  };
  const over = states.find((s) => s.over);
  if (over) {
    throw new ApiError("too-many-requests", `More than ${over.p.quota} requests a minute (${over.p.name}); retry in ${resetS} s.`, {
      headers: { ...headers, ratelimit: `"${over.p.name}";r=0;t=${resetS}`, "retry-after": String(resetS) },
    });
  }
  return headers;
}

/** Counters of windows that have ended count nothing any more (the worker calls this hourly). */
export async function purgeEndedWindows(db: Db, clock: Clock): Promise<number> {
  const before = new Date(clock.now().getTime() - 2 * RATE_WINDOW_SECONDS * 1000);
  return (await db.delete(rateLimitCounters).where(lt(rateLimitCounters.windowStartedAt, before)).returning({ bucket: rateLimitCounters.bucket })).length;
}
