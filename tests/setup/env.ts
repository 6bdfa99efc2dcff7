// setupFiles of the integration and e2e projects: the test stack's environment in each test worker, so lib/ and
// db/ modules used in-process talk to the same test database and secrets as the started server.
import { inject } from "vitest";

const info = inject("rillscale");
Object.assign(process.env, info.env, { RILLSCALE_TEST_URL: info.url });
