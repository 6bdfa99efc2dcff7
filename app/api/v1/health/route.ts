// GET /api/v1/health — whether the database and the job queue answer
import { sql } from "drizzle-orm";
import type { z } from "zod";
import type { Health } from "@/lib/api/schemas";
import { json, withPublic } from "@/lib/api/handler";
import { queueHealthy } from "@/jobs/client";
import { otherMethods } from "@/lib/api/fallbacks";

export const runtime = "nodejs";
export const dynamic = "force-dynamic";

export const GET = withPublic(async ({ db }) => {
  const database = await db.execute(sql`SELECT 1`).then(() => true, () => false);
  const queue = await queueHealthy();
  const body: z.infer<typeof Health> = { status: database && queue ? "ok" : "degraded", database: { ok: database }, queue: { ok: queue } };
  return json(body, database ? 200 : 503);
});

export const { POST, PUT, PATCH, DELETE, OPTIONS } = otherMethods("GET");
