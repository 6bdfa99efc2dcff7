// npm start — (bootstrap.sh has installed what was missing) the project cluster, the migrated and seeded
// `rillscale` database, a fresh-enough build, the SMTP catcher, the web process (scripts/web-server.ts) and the worker, until Ctrl-C.
import path from "node:path";
import { ensureCluster, projectRoot, stopCluster } from "@/db/cluster";
import { DEMO_ORGS, DEMO_PASSWORD } from "@/db/seed";
import { startMailCatcher } from "@/lib/mail/catcher";
import {
  appEnv, buildApp, buildIsStale, localSecrets, prepareDatabase, spawnServer, spawnWorker, stopChild, waitForHealth,
} from "@/scripts/stack";

const DATABASE = "rillscale";
const port = Number(process.env.PORT ?? 3000);
const smtpPort = Number(process.env.SMTP_PORT ?? 2525);
const mailDir = path.join(projectRoot, ".data", "mail");

const t0 = Date.now();
const cluster = await ensureCluster();
console.log(`rillscale: PostgreSQL on 127.0.0.1:${cluster.port} (${cluster.startedNow ? "started" : "already running"})`);
const secrets = localSecrets();
const seeded = await prepareDatabase(cluster, DATABASE, secrets);
if (buildIsStale()) buildApp();
const catcher = await startMailCatcher({ port: smtpPort, dir: mailDir });
const env = appEnv(cluster, secrets, { database: DATABASE, port, smtpPort: catcher.port, mailDir });
const web = spawnServer(env, port, "inherit");
const worker = spawnWorker(env, "inherit");

let stopping = false;
async function stop(code: number) {
  if (stopping) return;
  stopping = true;
  console.log("\nrillscale: stopping the web server and the worker");
  await Promise.all([stopChild(web), stopChild(worker)]);
  await catcher.close();
  if (cluster.startedNow) stopCluster();
  process.exit(code);
}
process.on("SIGINT", () => void stop(0));
process.on("SIGTERM", () => void stop(0));
web.on("exit", (c) => void stop(c ?? 1));
worker.on("exit", (c) => void stop(c ?? 1));

await waitForHealth(`http://127.0.0.1:${port}`, web);
const url = `http://127.0.0.1:${port}`;
console.log(`
rillscale is running at ${url}  (ready in ${((Date.now() - t0) / 1000).toFixed(1)} s; Ctrl-C stops it)
  API docs      ${url}/docs
  Caught mail   ${url}/dev/mail   (SMTP catcher on 127.0.0.1:${catcher.port})
Demo sign-ins (password "${DEMO_PASSWORD}"):
${DEMO_ORGS.flatMap((o) => o.members.map((m) => `  ${m.email.padEnd(32)} ${m.role.padEnd(8)} ${o.name}`)).join("\n")}
${seeded.apiKeySecret
    ? `Demo API key "demo script" (shown once — save it now):\n  ${seeded.apiKeySecret}\n  curl -H "Authorization: Bearer ${seeded.apiKeySecret}" ${url}/api/v1/me`
    : `Demo API key: its secret was printed on the first start; create a new one at ${url}/keys if you lost it.`}
`);
