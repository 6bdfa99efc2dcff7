import { describe, expect, it } from "vitest";
import { open, seal } from "@/lib/provenance/sealed-box";

const SECRET = "x".repeat(32);

describe("seal() / open()", () => {
  it("round-trips a secret and never stores it in plain form (derived)", () => {
    const sealed = seal("whsec_topsecret", SECRET, "webhook-secret");
    expect(sealed).not.toContain("topsecret");
    expect(open(sealed, SECRET, "webhook-secret")).toBe("whsec_topsecret");
    expect(seal("same", SECRET, "webhook-secret")).not.toBe(seal("same", SECRET, "webhook-secret")); // fresh nonce each time
  });

  it("does not open under another purpose, another server secret or after one flipped byte (GCM authentication, NIST SP 800-38D)", () => {
    const sealed = seal("k", SECRET, "provenance-signing-key");
    expect(() => open(sealed, SECRET, "webhook-secret")).toThrow();
    expect(() => open(sealed, "y".repeat(32), "provenance-signing-key")).toThrow();
    const [v, n, body] = sealed.split(".");
    const b = Buffer.from(body, "base64url");
    b[0] ^= 1;
    expect(() => open(`${v}.${n}.${b.toString("base64url")}`, SECRET, "provenance-signing-key")).toThrow();
  });

  it("refuses a server secret shorter than 32 characters (derived)", () => {
    expect(() => seal("k", "short", "webhook-secret")).toThrow(RangeError);
  });
});
