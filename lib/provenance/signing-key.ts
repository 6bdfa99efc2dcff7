// Ed25519 signing keys for provenance (RFC 8037): generated here, named by their RFC 7638 thumbprint, the
// private half kept only sealed (lib/provenance/sealed-box.ts), the public half published in the JWK Set.
import { exportJWK, generateKeyPair, importJWK, type CryptoKey, type JWK } from "jose";
import { SIGNING_ALG, keyId } from "@/lib/provenance/detached-jws";
import { open, seal } from "@/lib/provenance/sealed-box";

export interface NewSigningKey {
  kid: string;
  publicJwk: JWK;
  sealedPrivateJwk: string;
}

export async function generateSigningKey(serverSecret: string): Promise<NewSigningKey> {
  const { publicKey, privateKey } = await generateKeyPair(SIGNING_ALG, { crv: "Ed25519", extractable: true });
  const pub = await exportJWK(publicKey);
  const kid = await keyId(pub);
  const publicJwk: JWK = { ...pub, kid, alg: SIGNING_ALG, use: "sig" };
  const sealedPrivateJwk = seal(JSON.stringify(await exportJWK(privateKey)), serverSecret, "provenance-signing-key");
  return { kid, publicJwk, sealedPrivateJwk };
}

export async function openSigningKey(sealedPrivateJwk: string, serverSecret: string): Promise<CryptoKey> {
  const jwk = JSON.parse(open(sealedPrivateJwk, serverSecret, "provenance-signing-key")) as JWK;
  return (await importJWK(jwk, SIGNING_ALG)) as CryptoKey;
}
