import { describe, expect, it } from "vitest";
import { parseIdempotencyKey } from "@/lib/jobs/idempotency-key";

describe("parseIdempotencyKey", () => {
  it("parseIdempotencyKey() accepts the quoted sf-string and the bare form alike (draft-ietf-httpapi-idempotency-key-header §2.1; RFC 8941 §3.3.3)", () => {
    expect(parseIdempotencyKey('"8e03978e-40d5-43e8-bc93-6894a57f9324"')).toBe("8e03978e-40d5-43e8-bc93-6894a57f9324");
    expect(parseIdempotencyKey("8e03978e-40d5-43e8-bc93-6894a57f9324")).toBe("8e03978e-40d5-43e8-bc93-6894a57f9324");
    expect(parseIdempotencyKey('"a\\"b"')).toBe('a"b');
    expect(parseIdempotencyKey(null)).toBeNull();
  });

  it("parseIdempotencyKey() refuses empty, over-long and non-ASCII keys (derived)", () => {
    expect(() => parseIdempotencyKey('""')).toThrow(/1–255/);
    expect(() => parseIdempotencyKey("x".repeat(256))).toThrow(/1–255/);
    expect(() => parseIdempotencyKey("clé")).toThrow(/ASCII/);
  });
});
