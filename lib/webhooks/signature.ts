// Standard Webhooks 1.0 signatures (standardwebhooks.com, spec v1.0.0): secret `whsec_` + base64 of random
// bytes; `webhook-signature: v1,<base64 HMAC-SHA256(secret bytes, "{id}.{timestamp}.{body}")>`, several
// space-separated when a rotated secret is still in its overlap, so a receiver holding either one verifies.
import { createHmac, randomBytes, timingSafeEqual } from "node:crypto";

export const SECRET_PREFIX = "whsec_";
/** 32 bytes: inside the 24–64 the specification allows, and the HMAC-SHA256 block-size sweet spot. */
const SECRET_BYTES = 32;
/** Receivers reject timestamps further than this from their clock (the specification's replay window). */
export const TOLERANCE_SECONDS = 5 * 60;

export function generateSecret(): string {
  return SECRET_PREFIX + randomBytes(SECRET_BYTES).toString("base64");
}

function secretBytes(secret: string): Buffer {
  if (!secret.startsWith(SECRET_PREFIX)) throw new RangeError("a webhook secret starts with whsec_");
  const bytes = Buffer.from(secret.slice(SECRET_PREFIX.length), "base64");
  if (bytes.length < 24 || bytes.length > 64) throw new RangeError(`a webhook secret holds 24–64 bytes, got ${bytes.length}`);
  return bytes;
}

/** One `v1,<base64>` signature of the message. */
export function sign(secret: string, id: string, timestampS: number, body: string): string {
  const mac = createHmac("sha256", secretBytes(secret)).update(`${id}.${timestampS}.${body}`).digest("base64");
  return `v1,${mac}`;
}

/** The three headers of one attempt; `secrets` holds the current secret first, then any still overlapping. */
export function webhookHeaders(secrets: readonly string[], id: string, timestampS: number, body: string): Record<string, string> {
  if (secrets.length === 0) throw new RangeError("an endpoint needs at least one secret to sign with");
  return {
    "webhook-id": id,
    "webhook-timestamp": String(timestampS),
    "webhook-signature": secrets.map((s) => sign(s, id, timestampS, body)).join(" "),
  };
}

/** Receiver side (used by our own tests and documented for clients): true when any v1 signature matches. */
export function verify(secret: string, headers: Record<string, string | undefined>, body: string, nowS: number): boolean {
  const id = headers["webhook-id"], ts = Number(headers["webhook-timestamp"]), sigs = headers["webhook-signature"];
  if (!id || !Number.isInteger(ts) || !sigs || Math.abs(nowS - ts) > TOLERANCE_SECONDS) return false;
  const expected = Buffer.from(sign(secret, id, ts, body).slice(3), "base64");
  return sigs.split(" ").some((s) => {
    if (!s.startsWith("v1,")) return false;
    const got = Buffer.from(s.slice(3), "base64");
    return got.length === expected.length && timingSafeEqual(got, expected);
  });
}
