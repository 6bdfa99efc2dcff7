// Secrets the server must read back (provenance signing keys, webhook signing secrets) are stored sealed:
// AES-256-GCM (NIST SP 800-38D) under a key derived by HKDF-SHA-256 (RFC 5869) from a server secret and the
// purpose, so a database dump alone reveals none of them and one purpose's key never opens another's.
import { createCipheriv, createDecipheriv, hkdfSync, randomBytes } from "node:crypto";

const VERSION = "v1";
const NONCE_BYTES = 12; // the GCM nonce size SP 800-38D recommends
const TAG_BYTES = 16;

export type SealPurpose = "provenance-signing-key" | "webhook-secret";

function keyFor(serverSecret: string, purpose: SealPurpose): Buffer {
  if (serverSecret.length < 32) throw new RangeError("the server secret for sealing must be at least 32 characters");
  return Buffer.from(hkdfSync("sha256", serverSecret, "rillscale-sealed-box", purpose, 32));
}

/** `v1.<nonce>.<ciphertext+tag>` in base64url; the purpose is bound as associated data too. */
export function seal(plaintext: string, serverSecret: string, purpose: SealPurpose): string {
  const nonce = randomBytes(NONCE_BYTES);
  const cipher = createCipheriv("aes-256-gcm", keyFor(serverSecret, purpose), nonce);
  cipher.setAAD(Buffer.from(purpose));
  const body = Buffer.concat([cipher.update(plaintext, "utf8"), cipher.final(), cipher.getAuthTag()]);
  return `${VERSION}.${nonce.toString("base64url")}.${body.toString("base64url")}`;
}

export function open(sealed: string, serverSecret: string, purpose: SealPurpose): string {
  const [version, nonceText, bodyText] = sealed.split(".");
  if (version !== VERSION || !nonceText || !bodyText) throw new RangeError("not a sealed value of this server");
  const body = Buffer.from(bodyText, "base64url");
  const decipher = createDecipheriv("aes-256-gcm", keyFor(serverSecret, purpose), Buffer.from(nonceText, "base64url"));
  decipher.setAAD(Buffer.from(purpose));
  decipher.setAuthTag(body.subarray(body.length - TAG_BYTES));
  return Buffer.concat([decipher.update(body.subarray(0, body.length - TAG_BYTES)), decipher.final()]).toString("utf8");
}
