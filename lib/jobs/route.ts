// The wrapper of the dataset and job routes: the platform's withAuth (authentication, permission, error mapping)
// plus the request limits, whose headers every answer carries.
import "server-only";
import { withAuth, type AuthedContext, type Principal } from "@/lib/api/handler";
import type { Permission } from "@/lib/auth/permissions";
import { dataEnv } from "@/lib/jobs/config";
import { takeRequest } from "@/lib/jobs/rate-limit";

/** The caller inside its organisation: the API key, or the user of a session (idempotency and rate-limit scope). */
export const callerId = (p: Principal) => (p.kind === "api_key" ? `key:${p.key.id}` : `user:${p.user.id}`);

export function withDataRoute<P = Record<string, string>>(handler: (c: AuthedContext<P>) => Promise<Response>, permission: Permission) {
  return withAuth<P>(async (c) => {
    const e = dataEnv();
    const limits = await takeRequest(c.db, c.clock, [
      { name: "per-key", bucket: callerId(c.principal), quota: e.RILLSCALE_RATE_PER_KEY_PER_MINUTE },
      { name: "per-org", bucket: `org:${c.principal.org.id}`, quota: e.RILLSCALE_RATE_PER_ORG_PER_MINUTE },
    ]);
    const res = await handler(c);
    for (const [k, v] of Object.entries(limits)) res.headers.set(k, v);
    return res;
  }, { permission });
}
