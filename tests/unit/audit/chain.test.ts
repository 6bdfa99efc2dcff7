import { describe, expect, it } from "vitest";
import { GENESIS_HASH, canonicalJson, eventHash, verifyChain, type StoredLink } from "@/lib/audit/chain";

const base = { orgId: "o1", actorKind: "user", actorId: "u1", actorLabel: "a@b.example", target: null, ip: "127.0.0.1", details: {} };

function chain(n: number): StoredLink[] {
  const rows: StoredLink[] = [];
  let prev = GENESIS_HASH;
  for (let i = 0; i < n; i++) {
    const f = { ...base, at: new Date(Date.UTC(2026, 0, 1, 0, i)), action: `a.${i}`, details: { i } };
    const hash = eventHash(prev, f);
    rows.push({ ...f, id: i + 1, prevHash: prev, hash });
    prev = hash;
  }
  return rows;
}

describe("audit chain", () => {
  it("canonicalJson() sorts keys at every level, so key order does not change a hash (RFC 8785 idea)", () => {
    expect(canonicalJson({ b: 1, a: { d: [1, { f: 2, e: 3 }], c: null } })).toBe('{"a":{"c":null,"d":[1,{"e":3,"f":2}]},"b":1}');
  });

  it("verifyChain() accepts an untouched chain of 5 rows and counts them (derived)", () => {
    expect(verifyChain(chain(5))).toEqual({ ok: true, checked: 5 });
  });

  it("verifyChain() names the first edited row when a detail changes (Haber & Stornetta 1991)", () => {
    const rows = chain(5);
    rows[2] = { ...rows[2], details: { i: 99 } };
    expect(verifyChain(rows)).toEqual({ ok: false, checked: 3, firstBadId: "3" });
  });

  it("verifyChain() detects a removed middle row through the next row's prev_hash (derived)", () => {
    const rows = chain(5);
    rows.splice(1, 1);
    expect(verifyChain(rows).firstBadId).toBe("3");
  });

  it("eventHash() ignores a stored row's id and hashes, only its content (derived)", () => {
    const [r] = chain(1);
    expect(eventHash(GENESIS_HASH, { ...r, id: 42, hash: "x" } as StoredLink)).toBe(r.hash);
  });
});
