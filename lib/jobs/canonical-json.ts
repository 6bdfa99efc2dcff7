// Canonical JSON for hashing parameters and request fingerprints: object keys sorted by UTF-16 code units and
// no whitespace, as the JSON Canonicalization Scheme (RFC 8785 §3.2.3) orders them; numbers as JSON.stringify
// writes them (the ECMAScript shortest round-trip form RFC 8785 §3.2.2.3 adopts).
import { createHash } from "node:crypto";

export function canonicalJson(value: unknown): string {
  if (value === null || typeof value !== "object") return JSON.stringify(value) ?? "null";
  if (Array.isArray(value)) return `[${value.map((v) => (v === undefined ? "null" : canonicalJson(v))).join(",")}]`;
  const entries = Object.entries(value as Record<string, unknown>)
    .filter(([, v]) => v !== undefined)
    .sort(([a], [b]) => (a < b ? -1 : a > b ? 1 : 0));
  return `{${entries.map(([k, v]) => `${JSON.stringify(k)}:${canonicalJson(v)}`).join(",")}}`;
}

export const sha256Hex = (text: string) => createHash("sha256").update(text).digest("hex");
