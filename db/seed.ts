// The demo scenario (our own invented organisations): Tallow Creek Watershed Trust with one member per role and a
// "demo script" API key, and Brackenridge Survey Co-op for cross-organisation checks. Seeds once.
import { eq } from "drizzle-orm";
import type { Db } from "@/db/client";
import { memberships, organisations, users } from "@/db/schema";
import { createApiKey } from "@/lib/auth/api-keys";
import type { Clock } from "@/lib/auth/clock";
import { hashPassword } from "@/lib/auth/passwords";
import type { Role, Scope } from "@/lib/auth/permissions";

export const DEMO_PASSWORD = "rillscale-demo";
export const DEMO_KEY_SCOPES: Scope[] = ["datasets:write", "jobs:write", "jobs:read", "results:read"];

export const DEMO_ORGS = [
  {
    name: "Tallow Creek Watershed Trust",
    slug: "tallow-creek",
    members: [
      { email: "admin@tallow-creek.example", name: "Tallow Creek Admin", role: "admin" },
      { email: "analyst@tallow-creek.example", name: "Tallow Creek Analyst", role: "analyst" },
      { email: "auditor@tallow-creek.example", name: "Tallow Creek Auditor", role: "auditor" },
    ],
  },
  {
    name: "Brackenridge Survey Co-op",
    slug: "brackenridge",
    members: [{ email: "admin@brackenridge.example", name: "Brackenridge Admin", role: "admin" }],
  },
] as const satisfies readonly { name: string; slug: string; members: readonly { email: string; name: string; role: Role }[] }[];

/** Returns the demo key's secret when this call created the scenario, null when it was already there. */
export async function seedDemo(db: Db, pepper: string, clock: Clock): Promise<{ created: boolean; apiKeySecret: string | null }> {
  const [existing] = await db.select().from(organisations).where(eq(organisations.slug, DEMO_ORGS[0].slug));
  if (existing) return { created: false, apiKeySecret: null };
  const passwordHash = await hashPassword(DEMO_PASSWORD);
  return db.transaction(async (tx) => {
    const orgIds: string[] = [];
    for (const o of DEMO_ORGS) {
      const [org] = await tx.insert(organisations).values({ name: o.name, slug: o.slug }).returning();
      orgIds.push(org.id);
      for (const m of o.members) {
        const [u] = await tx.insert(users).values({ email: m.email, name: m.name, passwordHash }).returning();
        await tx.insert(memberships).values({ orgId: org.id, userId: u.id, role: m.role });
      }
    }
    const { secret } = await createApiKey(tx, pepper, { orgId: orgIds[0], name: "demo script", scopes: DEMO_KEY_SCOPES }, clock);
    return { created: true, apiKeySecret: secret };
  });
}
