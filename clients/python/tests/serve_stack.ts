// Brings up the same test stack as the integration suites (fresh database, scripts/web-server.ts, worker) for the
// Python client's tests: prints one line `RILLSCALE_TEST_STACK {url, key}` and tears the stack down when stdin closes.
import { acquireTestStack, releaseTestStack } from "@/tests/setup/stack";

const MARK = "RILLSCALE_TEST_STACK";

process.env.RILLSCALE_WEBHOOKS_ALLOW_PRIVATE ??= "1";
process.env.RILLSCALE_WEBHOOKS_RETRY_BASE_MS ??= "200";
const info = await acquireTestStack();
// The build and cluster scripts also write to stdout: the line for run.py is marked.
process.stdout.write(`${MARK} ${JSON.stringify({ url: info.url, key: info.demoKeySecret })}\n`);
let stopping = false;
const stop = async () => {
  if (stopping) return;
  stopping = true;
  await releaseTestStack();
  process.exit(0);
};
process.stdin.on("end", () => void stop());
process.stdin.on("close", () => void stop());
process.stdin.resume();
process.on("SIGTERM", () => void stop());
process.on("SIGINT", () => void stop());
