// Detached JWS with an unencoded payload: RFC 7515 (JWS) with RFC 7797 (`b64: false`, listed in `crit`), EdDSA
// over Ed25519 (RFC 8037), the key named by its RFC 7638 thumbprint, keys published as an RFC 7517 JWK Set.
// jose does the cryptography; this module fixes the choices so a token of any other shape is refused.
import { FlattenedSign, calculateJwkThumbprint, createLocalJWKSet, flattenedVerify, type JSONWebKeySet, type JWK, type CryptoKey } from "jose";

export const SIGNING_ALG = "EdDSA";

export class SignatureError extends Error {
  constructor(message: string) {
    super(message);
    this.name = "SignatureError";
  }
}

/** RFC 7638 thumbprint (SHA-256, base64url) of the public key: the `kid`. */
export const keyId = (publicJwk: JWK) => calculateJwkThumbprint(publicJwk, "sha256");

/** `protected..signature`: the compact serialisation with the payload detached (RFC 7515 Appendix F). */
export async function signDetached(payload: Uint8Array, privateKey: CryptoKey | Uint8Array, kid: string): Promise<string> {
  const jws = await new FlattenedSign(payload)
    .setProtectedHeader({ alg: SIGNING_ALG, kid, b64: false, crit: ["b64"] })
    .sign(privateKey as CryptoKey);
  return `${jws.protected}..${jws.signature}`;
}

export interface VerifiedSignature {
  kid: string;
  alg: string;
}

/**
 * Checks `compact` (a detached JWS) over `payload` with the key of its `kid` in `jwks`. Only EdDSA with
 * `b64: false` is accepted: `alg: none`, HMAC and attached or base64url-encoded payloads are refused.
 */
export async function verifyDetached(payload: Uint8Array, compact: string, jwks: JSONWebKeySet): Promise<VerifiedSignature> {
  const parts = compact.trim().split(".");
  if (parts.length !== 3 || parts[1] !== "") throw new SignatureError("not a detached compact JWS (expected header..signature)");
  let header: Record<string, unknown>;
  try {
    header = JSON.parse(Buffer.from(parts[0], "base64url").toString("utf8")) as Record<string, unknown>;
  } catch {
    throw new SignatureError("the protected header is not base64url JSON");
  }
  if (header.alg !== SIGNING_ALG) throw new SignatureError(`algorithm ${JSON.stringify(header.alg)} is refused; only ${SIGNING_ALG} is accepted`);
  if (header.b64 !== false || !Array.isArray(header.crit) || !header.crit.includes("b64")) {
    throw new SignatureError("the header must declare an unencoded payload (b64: false, crit: [\"b64\"], RFC 7797)");
  }
  if (typeof header.kid !== "string") throw new SignatureError("the header names no key (kid)");
  try {
    await flattenedVerify({ protected: parts[0], payload, signature: parts[2] }, createLocalJWKSet(jwks), { algorithms: [SIGNING_ALG] });
  } catch (e) {
    const code = (e as { code?: string }).code;
    if (code === "ERR_JWKS_NO_MATCHING_KEY") throw new SignatureError(`no published key has kid ${header.kid}`);
    throw new SignatureError(`the signature does not match the document (${code ?? (e as Error).message})`);
  }
  return { kid: header.kid, alg: SIGNING_ALG };
}
