import { describe, expect, it } from "vitest";
import { BlockedAddressError, checkWebhookUrl, guardedLookup, isBlockedAddress } from "@/lib/webhooks/address-guard";

describe("isBlockedAddress()", () => {
  it("blocks loopback, RFC 1918, link-local, CGNAT and unique-local addresses (RFC 6890 registries)", () => {
    for (const a of ["127.0.0.1", "10.1.2.3", "172.16.0.1", "172.31.255.255", "192.168.1.1", "169.254.169.254", "100.64.0.1", "0.0.0.0", "::1", "::", "fe80::1", "fd00::1", "::ffff:127.0.0.1", "::ffff:10.0.0.1"]) {
      expect(isBlockedAddress(a), a).toBe(true);
    }
  });

  it("lets public addresses through, including those next to the private ranges (RFC 1918 boundaries)", () => {
    for (const a of ["8.8.8.8", "172.15.255.255", "172.32.0.0", "11.0.0.1", "2606:4700:4700::1111", "::ffff:8.8.8.8"]) {
      expect(isBlockedAddress(a), a).toBe(false);
    }
  });
});

describe("checkWebhookUrl()", () => {
  it("refuses literal private hosts and localhost unless private targets are allowed (derived)", () => {
    expect(() => checkWebhookUrl("http://127.0.0.1:8080/hook", false)).toThrow(BlockedAddressError);
    expect(() => checkWebhookUrl("http://[::1]/hook", false)).toThrow(BlockedAddressError);
    expect(() => checkWebhookUrl("http://localhost/hook", false)).toThrow(BlockedAddressError);
    expect(checkWebhookUrl("http://127.0.0.1:8080/hook", true).port).toBe("8080");
  });

  it("refuses other schemes and credentials in the URL (derived)", () => {
    expect(() => checkWebhookUrl("ftp://example.com/", false)).toThrow(/http or https/);
    expect(() => checkWebhookUrl("https://u:p@example.com/", false)).toThrow(/credentials/);
    expect(() => checkWebhookUrl("not a url", false)).toThrow(/valid/);
  });
});

describe("guardedLookup()", () => {
  const resolve = (allow: boolean, host: string) => new Promise<unknown>((ok, fail) => {
    guardedLookup(allow)(host, {}, (err, address) => (err ? fail(err) : ok(address)));
  });

  it("fails a name that resolves to loopback at connection time, and passes it when allowed (DNS rebinding, derived)", async () => {
    await expect(resolve(false, "localhost")).rejects.toThrow(BlockedAddressError);
    expect(await resolve(true, "localhost")).toMatch(/^(127\.0\.0\.1|::1)$/);
  });
});
