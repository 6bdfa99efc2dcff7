// Settings of provenance signing and webhook delivery, validated once with zod on first use.
import { existsSync, readFileSync } from "node:fs";
import path from "node:path";
import { z } from "zod";

const bool = z.enum(["0", "1", "true", "false"]).transform((v) => v === "1" || v === "true");

const FollowUpEnvSchema = z.object({
  /** The active signing key is replaced by the worker's schedule once it is this old. */
  RILLSCALE_SIGNING_KEY_ROTATE_DAYS: z.coerce.number().min(1).max(3650).default(90),
  /** The commit of the running software for the provenance's software agent; read from .git when unset. */
  RILLSCALE_GIT_COMMIT: z.string().regex(/^[0-9a-f]{7,64}$/).optional(),
  /** Development and tests only: let webhooks reach private, loopback and link-local addresses. */
  RILLSCALE_WEBHOOKS_ALLOW_PRIVATE: bool.default(false),
  /** Delay before the second attempt of a failed delivery (doubling, with jitter, up to an hour). */
  RILLSCALE_WEBHOOKS_RETRY_BASE_MS: z.coerce.number().int().min(10).max(3_600_000).default(5_000),
  RILLSCALE_WEBHOOKS_MAX_ATTEMPTS: z.coerce.number().int().min(1).max(50).default(8),
  /** How often the worker looks for finished jobs and due deliveries. */
  RILLSCALE_FOLLOW_UP_POLL_MS: z.coerce.number().int().min(50).max(60_000).default(500),
});

export type FollowUpEnv = z.infer<typeof FollowUpEnvSchema>;
let cached: FollowUpEnv | undefined;

export function followUpEnv(): FollowUpEnv {
  if (cached) return cached;
  const r = FollowUpEnvSchema.safeParse(process.env);
  if (!r.success) throw new Error(`invalid provenance/webhook environment:\n${r.error.issues.map((i) => `  ${i.path.join(".")}: ${i.message}`).join("\n")}`);
  cached = r.data;
  return cached;
}

/** HEAD's commit from .git (a ref file or packed-refs), without running git; null outside a checkout. */
export function gitCommit(root = process.cwd()): string | null {
  const given = followUpEnv().RILLSCALE_GIT_COMMIT;
  if (given) return given;
  const git = path.join(root, ".git");
  try {
    const head = readFileSync(path.join(git, "HEAD"), "utf8").trim();
    if (!head.startsWith("ref: ")) return /^[0-9a-f]{40}$/.test(head) ? head : null;
    const ref = head.slice(5);
    if (existsSync(path.join(git, ref))) return readFileSync(path.join(git, ref), "utf8").trim();
    const packed = readFileSync(path.join(git, "packed-refs"), "utf8").split("\n").find((l) => l.endsWith(` ${ref}`));
    return packed ? packed.split(" ")[0] : null;
  } catch {
    return null;
  }
}
