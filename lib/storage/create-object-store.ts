// Picks and configures the object store from environment-like settings the caller passes in (the library
// never reads process.env itself; the app validates its environment once at boot and hands it here).
import { z } from "zod";
import { LocalDiskStore } from "@/lib/storage/local-disk";
import type { ObjectStore } from "@/lib/storage/object-store";
import { S3_MIN_PART_SIZE, S3Store, type S3StoreOptions } from "@/lib/storage/s3";

const MIB = 1024 * 1024;
/** Defaults: 8 MiB parts × 4 in flight = 32 MiB held per upload, a common balance of memory and throughput. */
const DEFAULT_PART_SIZE_MIB = 8;
const DEFAULT_QUEUE_SIZE = 4;

const flag = z.enum(["true", "false", "1", "0"]).transform((v) => v === "true" || v === "1");

/** The storage variables, for composition into the app's one environment schema. */
export const storageEnvSchema = z.object({
  RILLSCALE_STORAGE: z.enum(["local", "s3"]).default("local"),
  RILLSCALE_STORAGE_ROOT: z.string().min(1).default(".data/objects"),
  RILLSCALE_S3_BUCKET: z.string().min(3).optional(),
  RILLSCALE_S3_ENDPOINT: z.url().optional(),
  RILLSCALE_S3_REGION: z.string().min(1).default("us-east-1"),
  RILLSCALE_S3_FORCE_PATH_STYLE: flag.default(false),
  RILLSCALE_S3_ACCESS_KEY_ID: z.string().min(1).optional(),
  RILLSCALE_S3_SECRET_ACCESS_KEY: z.string().min(1).optional(),
  RILLSCALE_S3_PART_SIZE_MIB: z.coerce.number().int().min(S3_MIN_PART_SIZE / MIB).max(5 * 1024).default(DEFAULT_PART_SIZE_MIB),
  RILLSCALE_S3_QUEUE_SIZE: z.coerce.number().int().min(1).max(64).default(DEFAULT_QUEUE_SIZE),
  RILLSCALE_S3_CHECKSUMS: z.enum(["when_required", "when_supported"]).default("when_required"),
});

export type StorageConfig = { backend: "local"; root: string } | ({ backend: "s3" } & S3StoreOptions);

/** Reads the RILLSCALE_STORAGE* / RILLSCALE_S3_* settings; throws a ZodError naming each bad variable. */
export function storageConfigFromEnv(env: Record<string, string | undefined>): StorageConfig {
  const e = storageEnvSchema
    .superRefine((v, ctx) => {
      if (v.RILLSCALE_STORAGE !== "s3") return;
      if (!v.RILLSCALE_S3_BUCKET) ctx.addIssue({ code: "custom", path: ["RILLSCALE_S3_BUCKET"], message: "required when RILLSCALE_STORAGE=s3" });
      if (!v.RILLSCALE_S3_ACCESS_KEY_ID !== !v.RILLSCALE_S3_SECRET_ACCESS_KEY) {
        ctx.addIssue({ code: "custom", path: ["RILLSCALE_S3_SECRET_ACCESS_KEY"], message: "give both the access key id and the secret, or neither" });
      }
    })
    .parse(env);
  if (e.RILLSCALE_STORAGE === "local") return { backend: "local", root: e.RILLSCALE_STORAGE_ROOT };
  return {
    backend: "s3",
    bucket: e.RILLSCALE_S3_BUCKET as string,
    region: e.RILLSCALE_S3_REGION,
    endpoint: e.RILLSCALE_S3_ENDPOINT,
    forcePathStyle: e.RILLSCALE_S3_FORCE_PATH_STYLE,
    credentials: e.RILLSCALE_S3_ACCESS_KEY_ID && e.RILLSCALE_S3_SECRET_ACCESS_KEY
      ? { accessKeyId: e.RILLSCALE_S3_ACCESS_KEY_ID, secretAccessKey: e.RILLSCALE_S3_SECRET_ACCESS_KEY }
      : undefined,
    partSize: e.RILLSCALE_S3_PART_SIZE_MIB * MIB,
    queueSize: e.RILLSCALE_S3_QUEUE_SIZE,
    checksums: e.RILLSCALE_S3_CHECKSUMS,
  };
}

export function createObjectStore(config: StorageConfig): ObjectStore {
  if (config.backend === "local") return new LocalDiskStore({ root: config.root });
  const { backend: _backend, ...options } = config;
  return new S3Store(options);
}
