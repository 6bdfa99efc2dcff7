import { crc32 } from "node:zlib";
import { describe, expect, it } from "vitest";
import { KEY_PREFIX, formatKey, hashKey, newKeyId, newKeySecret, parseKey } from "@/lib/auth/api-keys";

describe("api-keys", () => {
  it("newKeySecret() makes rsk_<12 id>_<22 secret><6 check>, with ≥ 128 bits of secret (22·log2 62 ≈ 131, derived)", () => {
    const id = newKeyId();
    const key = newKeySecret(id);
    expect(key).toMatch(/^rsk_[0-9A-Za-z]{12}_[0-9A-Za-z]{28}$/);
    expect(key.startsWith(`${KEY_PREFIX}${id}_`)).toBe(true);
    expect(22 * Math.log2(62)).toBeGreaterThanOrEqual(128);
  });

  it("parseKey() returns the id of a well-formed key (derived)", () => {
    const id = newKeyId();
    expect(parseKey(newKeySecret(id))).toEqual({ id });
  });

  it("parseKey() refuses a key with one character of the secret changed: the CRC32 no longer matches (ISO 3309 CRC-32)", () => {
    const key = newKeySecret(newKeyId());
    const i = 20;
    const changed = key.slice(0, i) + (key[i] === "a" ? "b" : "a") + key.slice(i + 1);
    expect(parseKey(changed)).toBeNull();
    expect(parseKey(key.slice(0, -1))).toBeNull();
    expect(parseKey("Bearer nonsense")).toBeNull();
  });

  it("formatKey() checksum is the CRC32 of the body in 6 base62 digits: CRC32('123456789') = 0xCBF43926 (Koopman check value)", () => {
    const k = formatKey("AAAAAAAAAAAA", "B".repeat(22));
    expect(k).toHaveLength(4 + 12 + 1 + 22 + 6);
    // The check value of CRC-32/ISO-HDLC: node:zlib computes the standard CRC.
    expect(crc32("123456789")).toBe(0xcbf43926);
  });

  it("hashKey() is HMAC-SHA-256: RFC 4231 test case 2 (key 'Jefe')", () => {
    expect(hashKey("Jefe", "what do ya want for nothing?")).toBe("5bdcc146bf60754e6a042426089575c75a003f089d2739839dec58b964ec3843");
  });

  it("newKeyId() draws uniformly enough that 2000 ids use all 62 characters (derived)", () => {
    const seen = new Set(Array.from({ length: 2000 }, newKeyId).join(""));
    expect(seen.size).toBe(62);
  });
});
