// The local stack both `npm start` and the test harness bring up: a database on the project cluster, migrated and
// seeded; secrets; the SMTP catcher; the built app in our web process (scripts/web-server.ts); the job worker.
import { spawn, spawnSync, type ChildProcess } from "node:child_process";
import { randomBytes } from "node:crypto";
import { existsSync, mkdirSync, readFileSync, readdirSync, statSync, writeFileSync } from "node:fs";
import { createServer } from "node:net";
import path from "node:path";
import pg from "pg";
import { connectionUrl, ensureDatabase, projectRoot, type ClusterInfo } from "@/db/cluster";
import { makeDb } from "@/db/client";
import { migrateDatabase } from "@/db/migrate";
import { seedDemo } from "@/db/seed";
import { systemClock } from "@/lib/auth/clock";

export interface Secrets {
  keyPepper: string;
  sessionSecret: string;
}

export const newSecrets = (): Secrets => ({ keyPepper: randomBytes(32).toString("base64url"), sessionSecret: randomBytes(32).toString("base64url") });

/** Secrets of the local start, made once and kept in .data (git-ignored) so keys and sessions survive restarts. */
export function localSecrets(root = projectRoot): Secrets {
  const file = path.join(root, ".data", "secrets.json");
  if (existsSync(file)) return JSON.parse(readFileSync(file, "utf8")) as Secrets;
  const s = newSecrets();
  mkdirSync(path.dirname(file), { recursive: true });
  writeFileSync(file, JSON.stringify(s, null, 2), { mode: 0o600 });
  return s;
}

export interface AppEndpoints {
  database: string;
  port: number;
  smtpPort: number;
  mailDir: string;
}

export function appEnv(info: ClusterInfo, secrets: Secrets, e: AppEndpoints): Record<string, string> {
  return {
    DATABASE_URL: connectionUrl(info, "app", e.database),
    DATABASE_OWNER_URL: connectionUrl(info, "owner", e.database),
    RILLSCALE_PUBLIC_URL: `http://127.0.0.1:${e.port}`,
    RILLSCALE_KEY_PEPPER: secrets.keyPepper,
    RILLSCALE_SESSION_SECRET: secrets.sessionSecret,
    SMTP_HOST: "127.0.0.1",
    SMTP_PORT: String(e.smtpPort),
    RILLSCALE_MAIL_DIR: e.mailDir,
    RILLSCALE_DEV_MAIL: "1",
    PORT: String(e.port),
    NEXT_TELEMETRY_DISABLED: "1",
  };
}

/** Creates (if needed), migrates and seeds a database; the demo key's secret comes back only when seeded now. */
export async function prepareDatabase(info: ClusterInfo, database: string, secrets: Secrets) {
  await ensureDatabase(info, database);
  await migrateDatabase(connectionUrl(info, "owner", database));
  const pool = new pg.Pool({ connectionString: connectionUrl(info, "app", database), max: 2 });
  try {
    return await seedDemo(makeDb(pool), secrets.keyPepper, systemClock);
  } finally {
    await pool.end();
  }
}

export async function freePort(): Promise<number> {
  return new Promise((resolve, reject) => {
    const srv = createServer();
    srv.once("error", reject);
    srv.listen(0, "127.0.0.1", () => {
      const a = srv.address();
      srv.close(() => resolve(typeof a === "object" && a ? a.port : 0));
    });
  });
}

// What the built app is made of: a change to any of these makes the build stale.
const BUILD_INPUTS = ["app", "components", "lib", "db", "jobs", "openapi", "public", "next.config.ts", "instrumentation.ts",
  "tailwind.config.ts", "postcss.config.mjs", "package-lock.json", "tsconfig.json"];

function newestMtime(p: string): number {
  if (!existsSync(p)) return 0;
  const st = statSync(p);
  if (!st.isDirectory()) return st.mtimeMs;
  let newest = st.mtimeMs;
  for (const name of readdirSync(p)) newest = Math.max(newest, newestMtime(path.join(p, name)));
  return newest;
}

/** `npm start` and the tests share one build in .next (Next's default distDir). */
export function buildIsStale(root = projectRoot): boolean {
  const id = path.join(root, ".next", "BUILD_ID");
  if (!existsSync(id)) return true;
  const built = statSync(id).mtimeMs;
  return BUILD_INPUTS.some((p) => newestMtime(path.join(root, p)) > built);
}

const nextBin = (root: string) => path.join(root, "node_modules", "next", "dist", "bin", "next");

// Another checkout user's `next build` holds Next's build lock; wait for it rather than fail.
const BUILD_WAIT_MS = 10 * 60_000;

export function buildApp(root = projectRoot): void {
  const deadline = Date.now() + BUILD_WAIT_MS;
  for (;;) {
    console.log("rillscale: building the app (next build)");
    const r = spawnSync(process.execPath, [nextBin(root), "build"], {
      cwd: root, stdio: ["ignore", "inherit", "pipe"], encoding: "utf8", env: { ...process.env, NEXT_TELEMETRY_DISABLED: "1" },
    });
    process.stderr.write(r.stderr ?? "");
    if (r.status === 0) return;
    if (!/Another next build process is already running/.test(r.stderr ?? "") || Date.now() > deadline) throw new Error("next build failed");
    spawnSync("sleep", ["5"]);
    if (!buildIsStale(root)) return;
  }
}

export type Output = "inherit" | ((line: string) => void);

function pipeOutput(child: ChildProcess, out: Output, tag: string) {
  if (out === "inherit") return;
  for (const stream of [child.stdout, child.stderr]) {
    stream?.setEncoding("utf8");
    stream?.on("data", (chunk: string) => chunk.split("\n").filter(Boolean).forEach((l) => out(`[${tag}] ${l}`)));
  }
}

export function spawnServer(envVars: Record<string, string>, port: number, out: Output, root = projectRoot): ChildProcess {
  const child = spawn(process.execPath, ["--import", "tsx", path.join(root, "scripts", "web-server.ts"), "127.0.0.1", String(port)], {
    cwd: root, env: { ...process.env, ...envVars, NODE_ENV: "production" }, stdio: out === "inherit" ? ["ignore", "inherit", "inherit"] : ["ignore", "pipe", "pipe"],
  });
  pipeOutput(child, out, "web");
  return child;
}

export function spawnWorker(envVars: Record<string, string>, out: Output, root = projectRoot): ChildProcess {
  const child = spawn(process.execPath, ["--conditions=react-server", "--import", "tsx", path.join(root, "jobs", "worker.ts")], {
    cwd: root, env: { ...process.env, ...envVars, NODE_ENV: "production" }, stdio: out === "inherit" ? ["ignore", "inherit", "inherit"] : ["ignore", "pipe", "pipe"],
  });
  pipeOutput(child, out, "worker");
  return child;
}

export async function waitForHealth(url: string, child: ChildProcess, timeoutMs = 120_000): Promise<void> {
  const deadline = Date.now() + timeoutMs;
  while (Date.now() < deadline) {
    if (child.exitCode !== null) throw new Error(`the server exited (code ${child.exitCode}) before answering ${url}`);
    try {
      const r = await fetch(`${url}/api/v1/health`);
      if (r.ok && ((await r.json()) as { status: string }).status === "ok") return;
    } catch {
      // not listening yet
    }
    await new Promise((r) => setTimeout(r, 300));
  }
  throw new Error(`${url}/api/v1/health did not report ok within ${timeoutMs / 1000} s`);
}

/** SIGTERM, then SIGKILL after a grace period; resolves when the process has exited. */
export function stopChild(child: ChildProcess, graceMs = 15_000): Promise<void> {
  if (child.exitCode !== null || child.signalCode !== null) return Promise.resolve();
  return new Promise((resolve) => {
    const timer = setTimeout(() => child.kill("SIGKILL"), graceMs);
    child.once("exit", () => {
      clearTimeout(timer);
      resolve();
    });
    child.kill("SIGTERM");
  });
}
