// Single-use link tokens (password reset, invitation): 256 random bits in the link, only their SHA-256 stored,
// so a database dump cannot be turned into working links.
import { createHash, randomBytes } from "node:crypto";

export function newLinkToken(): { token: string; tokenHash: string } {
  const token = randomBytes(32).toString("base64url");
  return { token, tokenHash: hashLinkToken(token) };
}

export const hashLinkToken = (token: string) => createHash("sha256").update(token).digest("hex");
