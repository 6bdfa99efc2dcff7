// Hash chain over the audit log (each row's hash covers the previous row's hash of the same organisation,
// a Haber & Stornetta (1991) linked time-stamp chain), and its verifier.
import { createHash } from "node:crypto";

export const GENESIS_HASH = "0".repeat(64);

export interface ChainedFields {
  orgId: string | null;
  at: Date;
  action: string;
  actorKind: string;
  actorId: string | null;
  actorLabel: string;
  target: string | null;
  ip: string | null;
  details: Record<string, unknown>;
}

/** JSON with object keys sorted at every level, so the same event always hashes the same (RFC 8785 in spirit). */
export function canonicalJson(value: unknown): string {
  if (value === null || typeof value !== "object") return JSON.stringify(value ?? null);
  if (Array.isArray(value)) return `[${value.map(canonicalJson).join(",")}]`;
  const entries = Object.entries(value as Record<string, unknown>)
    .filter(([, v]) => v !== undefined)
    .sort(([a], [b]) => (a < b ? -1 : a > b ? 1 : 0));
  return `{${entries.map(([k, v]) => `${JSON.stringify(k)}:${canonicalJson(v)}`).join(",")}}`;
}

export function eventHash(prevHash: string, e: ChainedFields): string {
  // Only the chained fields: a stored row also carries its id and hashes, which are not part of the content.
  const body = canonicalJson({
    orgId: e.orgId, at: e.at.toISOString(), action: e.action, actorKind: e.actorKind, actorId: e.actorId,
    actorLabel: e.actorLabel, target: e.target, ip: e.ip, details: e.details,
  });
  return createHash("sha256").update(prevHash).update("\n").update(body).digest("hex");
}

export interface StoredLink extends ChainedFields {
  id: number;
  prevHash: string;
  hash: string;
}

/** Walks rows in id order; the first row whose link or content does not match is reported. */
export function verifyChain(rows: Iterable<StoredLink>): { ok: boolean; checked: number; firstBadId?: string } {
  let prev = GENESIS_HASH;
  let checked = 0;
  for (const r of rows) {
    checked++;
    if (r.prevHash !== prev || eventHash(r.prevHash, r) !== r.hash) return { ok: false, checked, firstBadId: String(r.id) };
    prev = r.hash;
  }
  return { ok: true, checked };
}
