import { Webhook } from "standardwebhooks";
import { describe, expect, it } from "vitest";
import { generateSecret, sign, verify, webhookHeaders } from "@/lib/webhooks/signature";

const body = JSON.stringify({ type: "job.succeeded", timestamp: "2026-12-01T10:00:00.000Z", data: { id: "j1" } });
const now = () => Math.floor(Date.now() / 1000);

describe("sign()", () => {
  it("reproduces the reference libraries' test vector (Standard Webhooks / svix test suites; from memory)", () => {
    expect(sign("whsec_MfKQ9r8GKYqrTwjUPD8ILPZIo2LaLaSw", "msg_p5jXN8AQM9LWM0D4loKWxJek", 1614265330, '{"test": 2432232314}'))
      .toBe("v1,g0hM9SsE+OTPJTGt/tmIKtSyZlE3uFJELVlNIOLJ1OE=");
  });

  it("refuses a secret without the whsec_ prefix or outside 24–64 bytes (Standard Webhooks 1.0)", () => {
    expect(() => sign("abc", "id", 1, "")).toThrow(RangeError);
    expect(() => sign("whsec_" + Buffer.alloc(8).toString("base64"), "id", 1, "")).toThrow(/24–64/);
  });
});

describe("webhookHeaders()", () => {
  it("is verified by the standardwebhooks npm package, an independent implementation", () => {
    const secret = generateSecret();
    expect(secret).toMatch(/^whsec_[A-Za-z0-9+/]{43}=$/);
    const headers = webhookHeaders([secret], "msg_1", now(), body);
    expect(new Webhook(secret).verify(body, headers)).toEqual(JSON.parse(body));
  });

  it("during a rotation overlap carries both signatures, so a receiver holding either secret verifies (derived)", () => {
    const current = generateSecret(), previous = generateSecret();
    const headers = webhookHeaders([current, previous], "msg_2", now(), body);
    expect(headers["webhook-signature"].split(" ")).toHaveLength(2);
    expect(() => new Webhook(current).verify(body, headers)).not.toThrow();
    expect(() => new Webhook(previous).verify(body, headers)).not.toThrow();
    expect(() => new Webhook(generateSecret()).verify(body, headers)).toThrow();
  });

  it("a changed body or id does not verify, with our verifier or the package's (derived)", () => {
    const secret = generateSecret();
    const ts = now();
    const headers = webhookHeaders([secret], "msg_3", ts, body);
    expect(verify(secret, headers, body, ts)).toBe(true);
    expect(verify(secret, headers, body + " ", ts)).toBe(false);
    expect(verify(secret, { ...headers, "webhook-id": "msg_4" }, body, ts)).toBe(false);
    expect(() => new Webhook(secret).verify(body.replace("j1", "j2"), headers)).toThrow();
  });

  it("our verifier refuses a timestamp more than five minutes away (the specification's replay window)", () => {
    const secret = generateSecret();
    const ts = now();
    const headers = webhookHeaders([secret], "msg_5", ts, body);
    expect(verify(secret, headers, body, ts + 301)).toBe(false);
    expect(verify(secret, headers, body, ts + 299)).toBe(true);
  });
});
