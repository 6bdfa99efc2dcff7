// The server's environment, validated once with zod (at boot in instrumentation.ts, by the start and test
// commands, and lazily on first use) — never read process.env.X directly elsewhere.
import "server-only";
import { z } from "zod";

const bool = z.enum(["0", "1", "true", "false"]).transform((v) => v === "1" || v === "true");

const EnvSchema = z.object({
  NODE_ENV: z.enum(["development", "production", "test"]).default("development"),
  DATABASE_URL: z.url({ message: "DATABASE_URL must be a postgres:// URL of the application role" }),
  DATABASE_OWNER_URL: z.url({ message: "DATABASE_OWNER_URL must be a postgres:// URL of the owner role (migrations, pg-boss)" }),
  RILLSCALE_PUBLIC_URL: z.url().default("http://127.0.0.1:3000"),
  RILLSCALE_KEY_PEPPER: z.string().min(32, { message: "RILLSCALE_KEY_PEPPER must be at least 32 characters" }),
  RILLSCALE_SESSION_SECRET: z.string().min(32, { message: "RILLSCALE_SESSION_SECRET must be at least 32 characters" }),
  SMTP_HOST: z.string().default("127.0.0.1"),
  SMTP_PORT: z.coerce.number().int().min(1).max(65535).default(2525),
  MAIL_FROM: z.string().default("Rillscale <no-reply@rillscale.example>"),
  RILLSCALE_MAIL_DIR: z.string().optional(),
  RILLSCALE_DEV_MAIL: bool.default(false),
  // How many trusted reverse proxies in front of scripts/web-server.ts append to X-Forwarded-For; the server appends
  // the socket's peer itself, so 0 means the peer's address is the client's.
  RILLSCALE_TRUSTED_PROXIES: z.coerce.number().int().min(0).max(10).default(0),
});

export type Env = z.infer<typeof EnvSchema>;

let cached: Env | undefined;

export function env(): Env {
  if (cached) return cached;
  const r = EnvSchema.safeParse(process.env);
  if (!r.success) {
    const lines = r.error.issues.map((i) => `  ${i.path.join(".")}: ${i.message}`).join("\n");
    throw new Error(`invalid environment (start with \`npm start\`, which sets it up):\n${lines}`);
  }
  cached = r.data;
  return cached;
}

/** Served over HTTPS: the session cookie is then `__Host-`-prefixed and Secure. */
export function isHttpsDeployment(): boolean {
  return new URL(env().RILLSCALE_PUBLIC_URL).protocol === "https:";
}

export function devMailEnabled(): boolean {
  return env().NODE_ENV !== "production" || env().RILLSCALE_DEV_MAIL;
}
