// The job worker: pg-boss 10 in the application database. Creates its queues at boot, works them, and stops
// gracefully on SIGTERM/SIGINT (running handlers finish; pg-boss fails what does not within the timeout).
import PgBoss from "pg-boss";
import { pool, db } from "@/db/client";
import { purgeExpired } from "@/lib/auth/cleanup";
import { systemClock } from "@/lib/auth/clock";
import { env } from "@/lib/env";
import { bossOptions, MAINTENANCE_QUEUE, QUEUES } from "@/jobs/queues";
import { workAnalysisQueues } from "@/jobs/handlers/register";
import { startFollowUp } from "@/jobs/follow-up";

const STOP_TIMEOUT_MS = 30_000;
// Hourly at minute 17, away from the top of the hour when other cron jobs pile up.
const MAINTENANCE_CRON = "17 * * * *";

const log = (msg: string) => console.log(`[worker ${new Date().toISOString()}] ${msg}`);

const boss = new PgBoss(bossOptions(env().DATABASE_OWNER_URL, "worker"));
boss.on("error", (e) => console.error(`[worker] pg-boss error: ${e.message}`));

await boss.start();
for (const q of QUEUES) {
  await boss.createQueue(q.name, q);
  await boss.updateQueue(q.name, q); // createQueue keeps an existing queue's settings; make them the ones above
}
await boss.schedule(MAINTENANCE_QUEUE, MAINTENANCE_CRON);
await boss.work(MAINTENANCE_QUEUE, async ([job]) => {
  const purged = await purgeExpired(db(), systemClock);
  log(`maintenance ${job.id}: purged ${JSON.stringify(purged)}`);
});
const analysis = await workAnalysisQueues(boss, log);
// Signed provenance of succeeded jobs, webhook deliveries of finished ones, the signing-key schedule.
const stopFollowUp = startFollowUp(log);
log(`started; queues: ${QUEUES.map((q) => q.name).join(", ")}`);

let stopping = false;
async function shutdown(signal: string) {
  if (stopping) return;
  stopping = true;
  log(`${signal}: stopping`);
  stopFollowUp();
  await analysis.stop();
  await boss.stop({ graceful: true, wait: true, timeout: STOP_TIMEOUT_MS });
  await pool().end();
  log("stopped");
  process.exit(0);
}
process.on("SIGTERM", () => void shutdown("SIGTERM"));
process.on("SIGINT", () => void shutdown("SIGINT"));
