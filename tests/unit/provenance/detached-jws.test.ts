import { FlattenedSign, SignJWT, exportJWK, generateKeyPair, type JWK } from "jose";
import { describe, expect, it } from "vitest";
import { SignatureError, keyId, signDetached, verifyDetached } from "@/lib/provenance/detached-jws";
import { generateSigningKey, openSigningKey } from "@/lib/provenance/signing-key";

const SECRET = "s".repeat(40);
const payload = new TextEncoder().encode('{"entity":{"rill:x":{"prov:label":"x"}}}');

async function keyPair() {
  const k = await generateSigningKey(SECRET);
  return { ...k, privateKey: await openSigningKey(k.sealedPrivateJwk, SECRET) };
}

describe("keyId()", () => {
  it("is the RFC 7638 thumbprint of the RFC's own example key (Jones & Sakimura 2015, §3.1)", async () => {
    const rfcKey: JWK = {
      kty: "RSA", e: "AQAB",
      n: "0vx7agoebGcQSuuPiLJXZptN9nndrQmbXEps2aiAFbWhM78LhWx4cbbfAAtVT86zwu1RK7aPFFxuhDR1L6tSoc_BJECPebWKRXjBZCiFV4n3oknjhMstn64tZ_2W-5JsGY4Hc5n9yBXArwl93lqt7_RN5w6Cf0h4QyQ5v-65YGjQR0_FDW2QvzqY368QQMicAtaSqzs8KJZgnYb9c7d0zgdAZHzu6qMQvRL5hajrn1n91CbOpbISD08qNLyrdkt-bFTWhAI4vMQFh6WeZu0fM4lFd2NcRwr3XPksINHaQ-G_xBniIqbw0Ls1jF44-csFCur-kEgU8awapJzKnqDKgw",
    };
    expect(await keyId(rfcKey)).toBe("NzbLsXh8uDCcd-6MNwXF4W_7noWXFZAfHkxZsRGC9Xs");
  });
});

describe("signDetached() / verifyDetached()", () => {
  it("a detached unencoded-payload JWS verifies against the JWK Set and names the signing key (RFC 7797, derived)", async () => {
    const k = await keyPair();
    const jws = await signDetached(payload, k.privateKey, k.kid);
    expect(jws).toMatch(/^[\w-]+\.\.[\w-]+$/);
    const header = JSON.parse(Buffer.from(jws.split(".")[0], "base64url").toString());
    expect(header).toEqual({ alg: "EdDSA", kid: k.kid, b64: false, crit: ["b64"] });
    expect(await verifyDetached(payload, jws, { keys: [k.publicJwk] })).toEqual({ kid: k.kid, alg: "EdDSA" });
  });

  it("flipping one byte of the document fails verification (derived)", async () => {
    const k = await keyPair();
    const jws = await signDetached(payload, k.privateKey, k.kid);
    for (const at of [0, 10, payload.length - 1]) {
      const bad = payload.slice();
      bad[at] ^= 0x01;
      await expect(verifyDetached(bad, jws, { keys: [k.publicJwk] })).rejects.toThrow(SignatureError);
    }
  });

  it("after a rotation, a document signed by the retired key still verifies while both keys are published (derived)", async () => {
    const old = await keyPair();
    const current = await keyPair();
    const oldJws = await signDetached(payload, old.privateKey, old.kid);
    const newJws = await signDetached(payload, current.privateKey, current.kid);
    const jwks = { keys: [current.publicJwk, old.publicJwk] };
    expect((await verifyDetached(payload, oldJws, jwks)).kid).toBe(old.kid);
    expect((await verifyDetached(payload, newJws, jwks)).kid).toBe(current.kid);
    await expect(verifyDetached(payload, oldJws, { keys: [current.publicJwk] })).rejects.toThrow(/no published key/);
  });

  it("refuses alg none (RFC 7515 §10.7 / common practice)", async () => {
    const k = await keyPair();
    const header = Buffer.from(JSON.stringify({ alg: "none", kid: k.kid, b64: false, crit: ["b64"] })).toString("base64url");
    await expect(verifyDetached(payload, `${header}..`, { keys: [k.publicJwk] })).rejects.toThrow(/refused/);
  });

  it("refuses an HS256 token even when the HMAC key is the published public key bytes (key-confusion, common practice)", async () => {
    const k = await keyPair();
    const hmacKey = Buffer.from(JSON.stringify(k.publicJwk));
    const jws = await new FlattenedSign(payload).setProtectedHeader({ alg: "HS256", kid: k.kid, b64: false, crit: ["b64"] }).sign(hmacKey);
    await expect(verifyDetached(payload, `${jws.protected}..${jws.signature}`, { keys: [k.publicJwk] })).rejects.toThrow(/HS256.*refused/);
    const jwt = await new SignJWT({}).setProtectedHeader({ alg: "HS256" }).sign(hmacKey);
    await expect(verifyDetached(payload, jwt, { keys: [k.publicJwk] })).rejects.toThrow(SignatureError);
  });

  it("refuses an EdDSA signature over the base64url-encoded payload (b64 true) (RFC 7797 §3, derived)", async () => {
    const { publicKey, privateKey } = await generateKeyPair("EdDSA", { crv: "Ed25519", extractable: true });
    const pub = { ...(await exportJWK(publicKey)), alg: "EdDSA" };
    const kid = await keyId(pub);
    const jws = await new FlattenedSign(payload).setProtectedHeader({ alg: "EdDSA", kid }).sign(privateKey);
    await expect(verifyDetached(payload, `${jws.protected}..${jws.signature}`, { keys: [{ ...pub, kid }] })).rejects.toThrow(/b64: false/);
  });
});
