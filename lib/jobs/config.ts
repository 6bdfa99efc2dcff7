// Settings of uploads, jobs and limits, validated once with zod on first use (the storage variables are
// lib/storage's own schema, composed in), so a bad value names itself instead of misbehaving later.
import { z } from "zod";
import { createObjectStore, storageConfigFromEnv, storageEnvSchema, type ObjectStore } from "@/lib/storage";

const GIB = 1024 ** 3;

/** The request limits count per fixed window of this many seconds. */
export const RATE_WINDOW_SECONDS = 60;

const DataEnvSchema = storageEnvSchema.extend({
  /** Largest upload accepted; the issue's default is 2 GiB. */
  RILLSCALE_UPLOAD_MAX_BYTES: z.coerce.number().int().min(1).max(1024 * GIB).default(2 * GIB),
  /** Where uploads are staged while they are hashed and inspected (on the local store's filesystem, the staged file is
   *  renamed into place; elsewhere it is copied). */
  RILLSCALE_UPLOAD_TMP: z.string().min(1).default(".data/uploads"),
  /** Jobs of one organisation running at once; more wait in the queue. */
  RILLSCALE_ORG_MAX_RUNNING_JOBS: z.coerce.number().int().min(1).max(1000).default(2),
  /** A running job whose worker has not written a heartbeat for this long is taken over by another worker. */
  RILLSCALE_JOB_STALE_SECONDS: z.coerce.number().int().min(2).max(3600).default(30),
  /** Requests per minute to the dataset and job routes, per API key (or signed-in user) and per organisation. */
  RILLSCALE_RATE_PER_KEY_PER_MINUTE: z.coerce.number().int().min(1).max(1_000_000).default(300),
  RILLSCALE_RATE_PER_ORG_PER_MINUTE: z.coerce.number().int().min(1).max(1_000_000).default(3000),
});

export type DataEnv = z.infer<typeof DataEnvSchema>;

let cached: { env: DataEnv; store: ObjectStore } | undefined;

function load() {
  if (cached) return cached;
  const r = DataEnvSchema.safeParse(process.env);
  if (!r.success) {
    const lines = r.error.issues.map((i) => `  ${i.path.join(".")}: ${i.message}`).join("\n");
    throw new Error(`invalid dataset/job environment:\n${lines}`);
  }
  cached = { env: r.data, store: createObjectStore(storageConfigFromEnv(process.env)) };
  return cached;
}

export const dataEnv = (): DataEnv => load().env;

/** The one object store of this process (datasets and artifacts). */
export const objectStore = (): ObjectStore => load().store;
