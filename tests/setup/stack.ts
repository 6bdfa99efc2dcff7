// The stack integration and e2e tests run against: its own database on the project cluster (created per run,
// dropped after), fresh secrets, the SMTP catcher, the built app in our web process on a free port, and the worker.
import { createWriteStream, existsSync, mkdirSync, readFileSync, rmSync } from "node:fs";
import path from "node:path";
import type { ChildProcess } from "node:child_process";
import { connectionUrl, dropDatabase, ensureCluster, projectRoot, startCommandHint, stopCluster, type ClusterInfo } from "@/db/cluster";
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
  users: number;
}

// The integration and e2e projects each run this global setup; one stack serves both (same vitest process).
const holder = globalThis as unknown as { __rillscaleTestStack?: Promise<Running> };

async function bringUp(): Promise<Running> {
  let cluster;
  try {
    cluster = await ensureCluster();
  } catch (e) {
    throw new Error(`the test database server is not reachable; start it with \`${startCommandHint()}\`\n${(e as Error).message}`);
  }
  const database = `rillscale_test_${process.pid}`;
  const secrets = newSecrets();
  await dropDatabase(cluster, database);
  const seeded = await prepareDatabase(cluster, database, secrets);
  if (!seeded.apiKeySecret) throw new Error(`the fresh test database ${database} was already seeded`);

  const runDir = path.join(projectRoot, ".data", `test-run-${process.pid}`);
  rmSync(runDir, { recursive: true, force: true });
  const mailDir = path.join(runDir, "mail");
  mkdirSync(mailDir, { recursive: true });
  // Outside the run directory, so the last run's server and worker output survives teardown for reading.
  const logFile = path.join(projectRoot, ".data", "test-server.log");
  const log = createWriteStream(logFile);
  const out = (line: string) => log.write(line + "\n");

  // The same build as `npm start` (a second distDir would make `next build` rewrite tsconfig.json for its types).
  if (buildIsStale()) buildApp();
  const catcher = await startMailCatcher({ port: 0, dir: mailDir });
  const port = await freePort();
  const env = {
    ...appEnv(cluster, secrets, { database, port, smtpPort: catcher.port, mailDir }),
    // objects and staged uploads of this run only, so "nothing stored" can be checked and teardown removes them
    RILLSCALE_STORAGE_ROOT: path.join(runDir, "objects"),
    RILLSCALE_UPLOAD_TMP: path.join(runDir, "uploads"),
  };
  const web = spawnServer(env, port, out);
  const worker = spawnWorker(env, out);
  const url = `http://127.0.0.1:${port}`;
  try {
    await waitForHealth(url, web);
  } catch (e) {
    await Promise.all([stopChild(web), stopChild(worker)]);
    await catcher.close();
    throw new Error(`${(e as Error).message}\n--- ${logFile} ---\n${readFileSync(logFile, "utf8").slice(-3000)}`);
  }
  const info: TestStackInfo = {
    url, database, env: { ...env, NODE_ENV: "test" }, mailDir, demoKeySecret: seeded.apiKeySecret, logFile,
    webPid: web.pid!, workerPid: worker.pid!, extraPidsFile: path.join(runDir, "extra-pids"),
    ownerUrl: connectionUrl(cluster, "owner", database), superUrl: connectionUrl(cluster, "super", database),
  };
  return { info, cluster, web, worker, catcher, users: 0 };
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
  await dropDatabase(running.cluster, running.info.database);
  rmSync(path.dirname(running.info.mailDir), { recursive: true, force: true });
  if (running.cluster.startedNow) stopCluster();
}
