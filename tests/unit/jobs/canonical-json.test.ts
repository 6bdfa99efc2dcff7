import { describe, expect, it } from "vitest";
import { canonicalJson } from "@/lib/jobs/canonical-json";

describe("canonicalJson", () => {
  it("canonicalJson() sorts keys at every depth and drops undefined members (RFC 8785 §3.2.3)", () => {
    expect(canonicalJson({ b: 1, a: { d: [3, { z: 1, y: 2 }], c: undefined } })).toBe('{"a":{"d":[3,{"y":2,"z":1}]},"b":1}');
  });

  it("canonicalJson() gives the same text for objects that differ only in key order (invariant, derived)", () => {
    const a = { kind: "drainage", params: { confidence: 0.95, basins: { mode: "all" } } };
    const b = { params: { basins: { mode: "all" }, confidence: 0.95 }, kind: "drainage" };
    expect(canonicalJson(a)).toBe(canonicalJson(b));
    expect(canonicalJson(a)).toBe(JSON.stringify(JSON.parse(canonicalJson(b))));
  });

  it("canonicalJson() writes numbers in the ECMAScript shortest form (RFC 8785 §3.2.2.3: 1e21, 0.1)", () => {
    expect(canonicalJson([1e21, 0.1, -0, 5e-7])).toBe("[1e+21,0.1,0,5e-7]");
  });
});
