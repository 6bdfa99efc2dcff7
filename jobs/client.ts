// The web process's pg-boss handle: sends jobs and reads queue state; the worker (jobs/worker.ts) does the work.
import "server-only";
import PgBoss from "pg-boss";
import { env } from "@/lib/env";
import { bossOptions, MAINTENANCE_QUEUE } from "@/jobs/queues";

const holder = globalThis as unknown as { __rillscaleBoss?: Promise<PgBoss> };

export function queueClient(): Promise<PgBoss> {
  holder.__rillscaleBoss ??= (async () => {
    const boss = new PgBoss(bossOptions(env().DATABASE_OWNER_URL, "sender"));
    boss.on("error", (e) => console.error("queue client:", e.message));
    await boss.start();
    return boss;
  })().catch((e) => {
    holder.__rillscaleBoss = undefined;
    throw e;
  });
  return holder.__rillscaleBoss;
}

/** True when pg-boss answers and the worker has created its queues. */
export async function queueHealthy(): Promise<boolean> {
  try {
    const boss = await queueClient();
    return (await boss.getQueue(MAINTENANCE_QUEUE)) !== null;
  } catch {
    return false;
  }
}
