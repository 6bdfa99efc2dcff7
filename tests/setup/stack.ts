// The stack integration and e2e tests run against: its own database on the project cluster (created per run,
// dropped after), fresh secrets, the SMTP catcher, the built app in our web process on a free port, and the worker.
import { createWriteStream, existsSync, type WriteStream, mkdirSync, readFileSync, rmSync } from "node:fs";
import path from "node:path";
import type { ChildProcess } from "node:child_process";
import {
  connectionUrl, dropDatabase, ensureCluster, projectRoot, requireCluster, startCommandHint, stopCluster, type ClusterInfo,
} from "@/db/cluster";
import { startMailCatcher, type MailCatcher } from "@/lib/mail/catcher";
import {
  appEnv, buildApp, buildIsStale, freePort, newSecrets, prepareDatabase, spawnServer, spawnWorker, stopChild, waitForHealth,
} from "@/scripts/stack";

/** What tests receive (vitest `provide`/`inject`, and the same values in process.env). */
export interface TestStackInfo {
  url: string;
  database: string;
  /** Environment for in-process use of lib/ and db/ against the test database (app role). */
  env: Record<string, string>;
  ownerUrl: string;
  superUrl: string;
  mailDir: string;
  demoKeySecret: string;
  logFile: string;
  /** For tests that measure or kill them: the web process and the worker. */
  webPid: number;
  workerPid: number;
  /** Pids a test wrote here (one a line: workers it started to replace a killed one) are stopped at teardown. */
  extraPidsFile: string;
}

interface Running {
  info: TestStackInfo;
  cluster: ClusterInfo & { startedNow: boolean };
  web: ChildProcess;
  worker: ChildProcess;
  catcher: MailCatcher;
  log: WriteStream;
  users: number;
}

// The integration and e2e projects each run this global setup; one stack serves both (same vitest process).
const holder = globalThis as unknown as { __rillscaleTestStack?: Promise<Running> };

/** A server and worker on a fresh seeded database, with the run's objects, staged uploads and mail under runDir. */
interface Launched {
  url: string;
  env: Record<string, string>;
  web: ChildProcess;
  worker: ChildProcess;
  catcher: MailCatcher;
  /** The server and worker output; closed by whoever stops them. */
  log: WriteStream;
  mailDir: string;
  demoKeySecret: string;
}

const closeLog = (log: WriteStream) => new Promise<void>((resolve) => log.end(resolve));

async function launch(
  cluster: ClusterInfo, database: string, runDir: string, logFile: string, overrides: Record<string, string>, beforeStart: () => void,
): Promise<Launched> {
  const secrets = newSecrets();
  await dropDatabase(cluster, database);
  const seeded = await prepareDatabase(cluster, database, secrets);
  if (!seeded.apiKeySecret) throw new Error(`the fresh test database ${database} was already seeded`);

  rmSync(runDir, { recursive: true, force: true });
  const mailDir = path.join(runDir, "mail");
  mkdirSync(mailDir, { recursive: true });
  const log = createWriteStream(logFile);
  const out = (line: string) => log.write(line + "\n");

  beforeStart();
  const catcher = await startMailCatcher({ port: 0, dir: mailDir });
  const port = await freePort();
  const env = {
    ...appEnv(cluster, secrets, { database, port, smtpPort: catcher.port, mailDir }),
    // objects and staged uploads of this run only, so "nothing stored" can be checked and teardown removes them
    RILLSCALE_STORAGE_ROOT: path.join(runDir, "objects"),
    RILLSCALE_UPLOAD_TMP: path.join(runDir, "uploads"),
    ...overrides,
  };
  const web = spawnServer(env, port, out);
  const worker = spawnWorker(env, out);
  const url = `http://127.0.0.1:${port}`;
  try {
    await waitForHealth(url, web);
  } catch (e) {
    await Promise.all([stopChild(web), stopChild(worker)]);
    await catcher.close();
    await closeLog(log);
    // Nothing of a failed launch stays behind; its log (outside runDir) is kept for reading.
    await dropDatabase(cluster, database);
    rmSync(runDir, { recursive: true, force: true });
    throw new Error(`${(e as Error).message}\n--- ${logFile} ---\n${readFileSync(logFile, "utf8").slice(-3000)}`);
  }
  return { url, env, web, worker, catcher, log, mailDir, demoKeySecret: seeded.apiKeySecret };
}

async function bringUp(): Promise<Running> {
  let cluster;
  try {
    cluster = await ensureCluster();
  } catch (e) {
    throw new Error(`the test database server is not reachable; start it with \`${startCommandHint()}\`\n${(e as Error).message}`);
  }
  const database = `rillscale_test_${process.pid}`;
  const runDir = path.join(projectRoot, ".data", `test-run-${process.pid}`);
  // Outside the run directory, so the last run's server and worker output survives teardown for reading.
  const logFile = path.join(projectRoot, ".data", "test-server.log");
  // The same build as `npm start` (a second distDir would make `next build` rewrite tsconfig.json for its types).
  const { url, env, web, worker, catcher, log, mailDir, demoKeySecret } = await launch(cluster, database, runDir, logFile, {}, () => {
    if (buildIsStale()) buildApp();
  });
  const info: TestStackInfo = {
    url, database, env: { ...env, NODE_ENV: "test" }, mailDir, demoKeySecret, logFile,
    webPid: web.pid!, workerPid: worker.pid!, extraPidsFile: path.join(runDir, "extra-pids"),
    ownerUrl: connectionUrl(cluster, "owner", database), superUrl: connectionUrl(cluster, "super", database),
  };
  return { info, cluster, web, worker, catcher, log, users: 0 };
}

/** A second server + worker beside the shared stack, for a suite that needs other settings (e.g. S3 storage). */
export interface ExtraStack {
  url: string;
  database: string;
  /** The environment the server and worker run with (overrides applied). */
  env: Record<string, string>;
  demoKeySecret: string;
  logFile: string;
  /** For a suite that kills its worker (it then starts and stops its own replacement). */
  workerPid: number;
  /** Stops the server, worker and mail catcher, drops the database and removes the run directory. */
  stop(): Promise<void>;
}

/** Starts an extra stack on its own database `rillscale_test_<pid>_<label>` with `overrides` over the shared
 *  stack's environment; it reuses the shared stack's build (made by the global setup), so it never builds. */
export async function startExtraStack(label: string, overrides: Record<string, string>): Promise<ExtraStack> {
  if (!/^[a-z0-9_]{1,20}$/.test(label)) throw new RangeError(`extra stack label must be [a-z0-9_]{1,20}, got ${JSON.stringify(label)}`);
  const cluster = await requireCluster();
  const database = `rillscale_test_${process.pid}_${label}`;
  const runDir = path.join(projectRoot, ".data", `test-run-${process.pid}-${label}`);
  const logFile = path.join(projectRoot, ".data", `test-server-${label}.log`);
  const { url, env, web, worker, catcher, log, demoKeySecret } = await launch(cluster, database, runDir, logFile, overrides, () => {
    if (buildIsStale()) throw new Error("the app build is stale; the shared test stack builds it first");
  });
  return {
    url, database, env, demoKeySecret, logFile, workerPid: worker.pid!,
    async stop() {
      await Promise.all([stopChild(web), stopChild(worker)]);
      await catcher.close();
      await closeLog(log);
      await dropDatabase(cluster, database);
      rmSync(runDir, { recursive: true, force: true });
    },
  };
}

export async function acquireTestStack(): Promise<TestStackInfo> {
  holder.__rillscaleTestStack ??= bringUp();
  const running = await holder.__rillscaleTestStack;
  running.users++;
  process.env.RILLSCALE_TEST_URL = running.info.url;
  return running.info;
}

function stopExtraPids(file: string) {
  if (!existsSync(file)) return;
  for (const pid of readFileSync(file, "utf8").split("\n").filter(Boolean).map(Number)) {
    try {
      process.kill(pid, "SIGKILL");
    } catch {
      // already gone
    }
  }
}

export async function releaseTestStack(): Promise<void> {
  const pending = holder.__rillscaleTestStack;
  if (!pending) return;
  const running = await pending;
  if (--running.users > 0) return;
  holder.__rillscaleTestStack = undefined;
  await Promise.all([stopChild(running.web), stopChild(running.worker)]);
  stopExtraPids(running.info.extraPidsFile);
  await running.catcher.close();
  await closeLog(running.log);
  await dropDatabase(running.cluster, running.info.database);
  rmSync(path.dirname(running.info.mailDir), { recursive: true, force: true });
  if (running.cluster.startedNow) stopCluster();
}
