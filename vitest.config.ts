import { defineConfig } from "vitest/config";
import { fileURLToPath } from "node:url";

const root = fileURLToPath(new URL(".", import.meta.url));

// Three suites, one runner: unit (lib, no DB), integration (API + real PostgreSQL + worker),
// e2e (a started server driven by Debian's Chromium). scripts/test.ts runs them all.
export default defineConfig({
  // `server-only` throws outside a react-server bundle; tests exercise server modules directly, so it is a no-op here.
  resolve: { alias: { "@": root, "server-only": `${root}node_modules/server-only/empty.js` } },
  test: {
    projects: [
      {
        extends: true,
        test: { name: "unit", include: ["tests/unit/**/*.test.ts"], testTimeout: 120_000 },
      },
      {
        extends: true,
        test: {
          name: "integration",
          include: ["tests/integration/**/*.test.ts"],
          globalSetup: ["tests/setup/global.ts"],
          setupFiles: ["tests/setup/env.ts"],
          testTimeout: 120_000,
          hookTimeout: 300_000,
          fileParallelism: false,
        },
      },
      {
        extends: true,
        test: {
          name: "e2e",
          include: ["tests/e2e/**/*.test.ts"],
          globalSetup: ["tests/setup/global.ts"],
          setupFiles: ["tests/setup/env.ts"],
          testTimeout: 180_000,
          hookTimeout: 300_000,
          fileParallelism: false,
        },
      },
    ],
  },
});
