// vitest globalSetup of the integration and e2e projects: bring the test stack up, hand its coordinates to the
// tests (`inject("rillscale")`, and RILLSCALE_TEST_URL in the environment), tear it down afterwards.
import type { TestProject } from "vitest/node";
import { acquireTestStack, releaseTestStack, type TestStackInfo } from "@/tests/setup/stack";

declare module "vitest" {
  export interface ProvidedContext {
    rillscale: TestStackInfo;
  }
}

export default async function setup(project: TestProject) {
  // The webhook suite delivers to a loopback receiver and waits for retries: allow it and retry fast
  // (the server and worker inherit this environment).
  process.env.RILLSCALE_WEBHOOKS_ALLOW_PRIVATE ??= "1";
  process.env.RILLSCALE_WEBHOOKS_RETRY_BASE_MS ??= "200";
  const info = await acquireTestStack();
  project.provide("rillscale", info);
  return releaseTestStack;
}
