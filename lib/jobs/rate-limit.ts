// Request limits of the dataset and job routes: a fixed one-minute window per caller (API key, or user for a
// session) and per organisation, counted in PostgreSQL so every web process shares the counts. Headers per
// draft-ietf-httpapi-ratelimit-headers-09: `RateLimit-Policy: "per-key";q=300;w=60, "per-org";q=3000;w=60` and
// `RateLimit: "per-key";r=<remaining>;t=<seconds to reset>` (the policy nearest its limit).
import { lt, sql } from "drizzle-orm";
import type { Db } from "@/db/client";
import { rateLimitCounters } from "@/db/schema";
import { ApiError } from "@/lib/api/problem";
import type { Clock } from "@/lib/auth/clock";
import { RATE_WINDOW_SECONDS } from "@/lib/jobs/config";

export interface RatePolicy {
  name: "per-key" | "per-org";
  bucket: string;
  quota: number;
}

/** Counts this request against each policy; throws 429 (with Retry-After) when one is over its quota. */
export async function takeRequest(db: Db, clock: Clock, policies: RatePolicy[]): Promise<Record<string, string>> {
  const nowMs = clock.now().getTime();
  const windowStart = new Date(Math.floor(nowMs / (RATE_WINDOW_SECONDS * 1000)) * RATE_WINDOW_SECONDS * 1000);
  const resetS = Math.max(1, Math.ceil((windowStart.getTime() + RATE_WINDOW_SECONDS * 1000 - nowMs) / 1000));
  const rows = await db.insert(rateLimitCounters)
    .values(policies.map((p) => ({ bucket: p.bucket, windowStartedAt: windowStart, count: 1 })))
    .onConflictDoUpdate({
      target: rateLimitCounters.bucket,
      set: {
        count: sql`CASE WHEN ${rateLimitCounters.windowStartedAt} = excluded.window_started_at THEN ${rateLimitCounters.count} + 1 ELSE 1 END`,
        windowStartedAt: sql`excluded.window_started_at`,
      },
    })
    .returning({ bucket: rateLimitCounters.bucket, count: rateLimitCounters.count });
  const used = new Map(rows.map((r) => [r.bucket, r.count]));
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
