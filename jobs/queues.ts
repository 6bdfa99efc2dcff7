// The pg-boss queues and the settings they are created with at worker boot (STANDARDS.md, pg-boss 10 facts:
// createQueue before send/work; retry and expiry explicit because the defaults surprise).
import type PgBoss from "pg-boss";
import { JOB_KINDS, queueOf, type JobKind } from "@/lib/jobs/kinds";

export const MAINTENANCE_QUEUE = "maintenance";

const ANALYSIS_EXPIRY_SECONDS: Record<JobKind, number> = { drainage: 3 * 3600, surface: 3 * 3600, network: 3600, line: 3600 };

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
  // One queue per analysis kind. Two retries 30 s apart, doubling: a worker lost mid-run is also taken over by
  // the stale-heartbeat reaper (jobs/handlers/register.ts), so retries cover only our own transient failures.
  // Expiry is long because a large DEM runs for many minutes; it does not stop a handler (pg-boss), and a late
  // duplicate delivery finds the job claimed or finished in our table and does nothing.
  ...JOB_KINDS.map((kind): PgBoss.Queue => ({
    name: queueOf(kind),
    policy: "standard",
    retryLimit: 2,
    retryDelay: 30,
    retryBackoff: true,
    expireInSeconds: ANALYSIS_EXPIRY_SECONDS[kind],
  })),
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
