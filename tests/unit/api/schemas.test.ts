import { describe, expect, it } from "vitest";
import { ApiKeyCreateBody, NewPasswordSchema, SignInBody } from "@/lib/api/schemas";

describe("schemas", () => {
  it("NewPasswordSchema refuses a password over 72 UTF-8 bytes with a message naming the limit (bcrypt's 72-byte input, Provos & Mazières 1999)", () => {
    const r = NewPasswordSchema.safeParse("é".repeat(37)); // 74 bytes, 37 characters
    expect(r.success).toBe(false);
    expect(r.error?.issues[0].message).toMatch(/72 bytes/);
    expect(NewPasswordSchema.safeParse("a".repeat(72)).success).toBe(true);
  });

  it("SignInBody normalises the e-mail to trimmed lower case (common practice)", () => {
    expect(SignInBody.parse({ email: " Admin@Tallow-Creek.Example ", password: "x" }).email).toBe("admin@tallow-creek.example");
  });

  it("ApiKeyCreateBody needs at least one known scope (platform contract)", () => {
    expect(ApiKeyCreateBody.safeParse({ name: "n", scopes: [] }).success).toBe(false);
    expect(ApiKeyCreateBody.safeParse({ name: "n", scopes: ["jobs:delete"] }).success).toBe(false);
    expect(ApiKeyCreateBody.safeParse({ name: "n", scopes: ["jobs:read"] }).success).toBe(true);
  });
});
