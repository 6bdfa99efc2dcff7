// Refusing webhook targets inside private networks (server-side request forgery, OWASP SSRF Prevention Cheat
// Sheet): every address a name resolves to is checked against the IANA special-purpose registries (RFC 6890,
// RFC 1918, RFC 6598, RFC 3927, RFC 4193, RFC 4291), at connection time, so a name that re-resolves to a
// private address after registration (DNS rebinding) is refused too.
import { BlockList, isIP } from "node:net";
import { lookup as dnsLookup, type LookupAddress } from "node:dns";

const blocked = new BlockList();
for (const [net, bits] of [
  ["0.0.0.0", 8], ["10.0.0.0", 8], ["100.64.0.0", 10], ["127.0.0.0", 8], ["169.254.0.0", 16], ["172.16.0.0", 12],
  ["192.0.0.0", 24], ["192.0.2.0", 24], ["192.88.99.0", 24], ["192.168.0.0", 16], ["198.18.0.0", 15], ["198.51.100.0", 24],
  ["203.0.113.0", 24], ["224.0.0.0", 4], ["240.0.0.0", 4],
] as const) blocked.addSubnet(net, bits, "ipv4");
for (const [net, bits] of [
  ["::", 128], ["::1", 128], ["64:ff9b::", 96], ["100::", 64], ["2001::", 23], ["2001:db8::", 32], ["fc00::", 7], ["fe80::", 10], ["ff00::", 8],
] as const) blocked.addSubnet(net, bits, "ipv6");

export class BlockedAddressError extends Error {
  readonly code = "EWEBHOOKBLOCKED";
  constructor(readonly address: string) {
    super(`${address} is a private, loopback, link-local or reserved address; webhooks are not sent there`);
    this.name = "BlockedAddressError";
  }
}

/** True for addresses a webhook must not reach. IPv4-mapped IPv6 (::ffff:a.b.c.d) is judged as its IPv4. */
export function isBlockedAddress(address: string): boolean {
  const mapped = /^::ffff:(\d+\.\d+\.\d+\.\d+)$/i.exec(address);
  if (mapped) return blocked.check(mapped[1], "ipv4");
  const family = isIP(address);
  if (family === 0) return true;
  return blocked.check(address, family === 4 ? "ipv4" : "ipv6");
}

/** URL checks that need no DNS: http(s) only, no credentials, and a literal IP in the URL judged at once. */
export function checkWebhookUrl(raw: string, allowPrivate: boolean): URL {
  let url: URL;
  try {
    url = new URL(raw);
  } catch {
    throw new RangeError("the webhook URL is not a valid absolute URL");
  }
  if (url.protocol !== "https:" && url.protocol !== "http:") throw new RangeError("the webhook URL must be http or https");
  if (url.username || url.password) throw new RangeError("the webhook URL may not carry credentials");
  const host = url.hostname.replace(/^\[|\]$/g, "");
  if (!allowPrivate && (host === "localhost" || host.endsWith(".localhost") || (isIP(host) !== 0 && isBlockedAddress(host)))) {
    throw new BlockedAddressError(host);
  }
  return url;
}

type LookupCallback = (err: NodeJS.ErrnoException | null, address: string | LookupAddress[], family?: number) => void;

/** A `lookup` for http.request that resolves as usual and fails the connection when any address is blocked. */
export function guardedLookup(allowPrivate: boolean) {
  return (hostname: string, options: object, callback: LookupCallback) => {
    dnsLookup(hostname, { ...options, all: true }, (err, addresses) => {
      if (err) return callback(err, []);
      const bad = allowPrivate ? undefined : addresses.find((a) => isBlockedAddress(a.address));
      if (bad) return callback(new BlockedAddressError(bad.address) as unknown as NodeJS.ErrnoException, []);
      if ((options as { all?: boolean }).all) return callback(null, addresses);
      callback(null, addresses[0].address, addresses[0].family);
    });
  };
}
