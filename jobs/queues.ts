// The pg-boss queues and the settings they are created with at worker boot (STANDARDS.md, pg-boss 10 facts:
// createQueue before send/work; retry and expiry explicit because the defaults surprise).
import type PgBoss from "pg-boss";

export const MAINTENANCE_QUEUE = "maintenance";

export const QUEUES: PgBoss.Queue[] = [
  {
    name: MAINTENANCE_QUEUE,
    // Purging is idempotent and re-runs hourly anyway: two quick retries, then wait for the next run.
    policy: "singleton",
    retryLimit: 2,
    retryDelay: 60,
    retryBackoff: true,
    expireInSeconds: 10 * 60,
  },
];

/** pg-boss owns its schema (it creates one partition per queue), so it connects as the owner role. */
export function bossOptions(ownerUrl: string, role: "worker" | "sender"): PgBoss.ConstructorOptions {
  return {
    connectionString: ownerUrl,
    max: role === "worker" ? 4 : 2,
    application_name: `rillscale-${role}`,
    // Only the worker runs pg-boss's supervision and cron; web processes just send and read queue state.
    supervise: role === "worker",
    schedule: role === "worker",
    migrate: role === "worker",
  };
}
