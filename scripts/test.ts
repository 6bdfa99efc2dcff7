// npm test — every suite in one run: prerequisites, then unit, integration and e2e (vitest),
// then the Python client's tests; ends with one plain "N passed, N failed" line.
import { spawnSync } from "node:child_process";
import { existsSync, mkdirSync, readFileSync } from "node:fs";
import path from "node:path";

const root = path.resolve(import.meta.dirname, "..");
const resultsDir = path.join(root, ".data", "test-results");
mkdirSync(resultsDir, { recursive: true });

function run(cmd: string, args: string[], env: Record<string, string> = {}): number {
  const r = spawnSync(cmd, args, { cwd: root, stdio: "inherit", env: { ...process.env, ...env } });
  return r.status ?? 1;
}

interface Tally { passed: number; failed: number }
const tallies: Record<string, Tally> = {};

// Open-data fixtures (Debian packages, GDAL-made GeoTIFF variants); cached under tests/fixtures/cache.
if (existsSync(path.join(root, "tests/fixtures/fetch.sh"))) {
  if (run("bash", ["tests/fixtures/fetch.sh"]) !== 0) {
    tallies.fixtures = { passed: 0, failed: 1 };
    console.error("fixtures: fetching the open-data fixtures failed");
  }
}

// Type checking: `next build` skips it (a build must not depend on every file at once), so it is a suite here.
const typecheckStatus = run("npx", ["tsc", "--noEmit", "--pretty", "false"]);
tallies.typecheck = typecheckStatus === 0 ? { passed: 1, failed: 0 } : { passed: 0, failed: 1 };

// Vitest: all three projects in one invocation; integration and e2e start their own
// PostgreSQL database, server and worker in their global setup (tests/setup/).
const vitestJson = path.join(resultsDir, "vitest.json");
const vitestStatus = run("npx", ["vitest", "run", "--reporter=default", "--reporter=json", `--outputFile.json=${vitestJson}`]);
if (existsSync(vitestJson)) {
  const report = JSON.parse(readFileSync(vitestJson, "utf8")) as {
    numPassedTests: number; numFailedTests: number; numFailedTestSuites: number;
    testResults: { assertionResults: unknown[]; status: string }[];
  };
  // A file that fails to load has no assertion results: count it as one failure.
  const brokenFiles = report.testResults.filter((f) => f.status === "failed" && f.assertionResults.length === 0).length;
  tallies.vitest = { passed: report.numPassedTests, failed: report.numFailedTests + brokenFiles };
  if (vitestStatus !== 0 && tallies.vitest.failed === 0) tallies.vitest.failed = 1;
} else {
  tallies.vitest = { passed: 0, failed: 1 };
}

// Python client (standard library unittest) — added by the client's own test module when present.
const pyTests = path.join(root, "clients/python/tests");
if (existsSync(pyTests)) {
  const pyJson = path.join(resultsDir, "python.json");
  const status = run("python3", ["clients/python/tests/run.py", pyJson]);
  if (existsSync(pyJson)) tallies.python = JSON.parse(readFileSync(pyJson, "utf8")) as Tally;
  else tallies.python = { passed: 0, failed: status === 0 ? 0 : 1 };
}

let passed = 0, failed = 0;
for (const [suite, t] of Object.entries(tallies)) {
  console.log(`${suite}: ${t.passed} passed, ${t.failed} failed`);
  passed += t.passed; failed += t.failed;
}
console.log(`${passed} passed, ${failed} failed`);
process.exit(failed > 0 || passed === 0 ? 1 : 0);
