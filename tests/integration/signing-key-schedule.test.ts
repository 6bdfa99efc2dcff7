// The worker's signing-key schedule (lib/provenance/keys.ts rotateIfDue, RILLSCALE_SIGNING_KEY_ROTATE_DAYS) with an
// injected clock: not due a day before the key's age limit, rotated a day after it, and a document the server signed
// before still verifies against the JWK Set published afterwards. Runs on the test database inside a transaction
// that is rolled back, so the shared stack's keys stay as they were.
import { eq } from "drizzle-orm";
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import type { Db } from "@/db/client";
import { signingKeys } from "@/db/schema";
import { followUpEnv } from "@/lib/provenance/config";
import { signDetached, verifyDetached } from "@/lib/provenance/detached-jws";
import { activeSigningKey, publishedJwks, rotateIfDue } from "@/lib/provenance/keys";
import { AUDITOR, api, appDb, signIn, stack } from "@/tests/integration/client";
import { eventually, finishedJob } from "@/tests/integration/provenance-fixture";

const DAY_MS = 86_400_000;
const { pool, db } = appDb();
let docBytes = new Uint8Array();
let jws = "";

class RolledBack extends Error {}

/** Runs `f` in a transaction that is always rolled back; a failure inside it is rethrown as it is. */
async function inRolledBackTransaction(f: (tx: Db) => Promise<void>) {
  try {
    await db.transaction(async (tx) => {
      await f(tx as unknown as Db);
      throw new RolledBack();
    });
  } catch (e) {
    if (e instanceof RolledBack) return;
    throw e;
  }
  throw new Error("the transaction was not rolled back");
}

beforeAll(async () => {
  const auditor = await signIn(AUDITOR);
  const { job } = await finishedJob(stack().demoKeySecret, 6);
  const doc = await eventually(`/api/v1/jobs/${job.id}/provenance`, { cookie: auditor });
  expect(doc.status).toBe(200);
  docBytes = new Uint8Array(await doc.arrayBuffer());
  jws = await (await api(`/api/v1/jobs/${job.id}/provenance.jws`, { cookie: auditor })).text();
});

afterAll(async () => {
  await pool.end();
});

describe("scheduled signing-key rotation (issue 7)", () => {
  it("the active key is kept a day before RILLSCALE_SIGNING_KEY_ROTATE_DAYS, replaced a day after; the earlier document still verifies (derived)", async () => {
    const secret = stack().env.RILLSCALE_KEY_PEPPER;
    const days = followUpEnv().RILLSCALE_SIGNING_KEY_ROTATE_DAYS;
    expect(days).toBe(90); // the default the stack runs with (lib/provenance/config.ts)
    const before = await verifyDetached(docBytes, jws, await publishedJwks(db));
    const activeBefore = (await activeSigningKey(db, secret)).kid;

    await inRolledBackTransaction(async (tx) => {
      const old = await activeSigningKey(tx, secret);
      const born = old.createdAt.getTime();
      expect(await rotateIfDue(tx, secret, days, new Date(born + (days - 1) * DAY_MS))).toBeNull();
      const rotatedAt = new Date(born + (days + 1) * DAY_MS);
      const fresh = await rotateIfDue(tx, secret, days, rotatedAt);
      expect(fresh).not.toBeNull();
      expect(fresh).not.toBe(old.kid);
      // the schedule does not rotate the fresh key again at the same instant
      expect(await rotateIfDue(tx, secret, days, rotatedAt)).toBeNull();

      const [retired] = await tx.select().from(signingKeys).where(eq(signingKeys.kid, old.kid));
      expect(retired.retiredAt?.getTime()).toBe(rotatedAt.getTime());
      expect(retired.sealedPrivateJwk).toBeNull(); // the private half is erased, the public half stays published
      expect((await activeSigningKey(tx, secret)).kid).toBe(fresh);

      const jwks = await publishedJwks(tx);
      expect(jwks.keys.map((k) => k.kid)).toEqual(expect.arrayContaining([old.kid, fresh]));
      // the document signed before the rotation verifies with the key it names, still in the set
      expect(await verifyDetached(docBytes, jws, jwks)).toEqual(before);
      // and what is signed now names the new key and verifies too
      const payload = new TextEncoder().encode('{"after":"rotation"}');
      const now = await activeSigningKey(tx, secret);
      expect(await verifyDetached(payload, await signDetached(payload, now.privateKey, now.kid), jwks)).toEqual({ kid: fresh, alg: "EdDSA" });
    });

    // rolled back: the shared stack's active key is the one it had
    expect((await activeSigningKey(db, secret)).kid).toBe(activeBefore);
  });
});
