import { describe, expect, it } from "vitest";
import { ApiError } from "@/lib/api/problem";
import { parseRange } from "@/lib/jobs/artifacts";

describe("parseRange", () => {
  it("parseRange() reads first-last, open-ended and suffix ranges, clamping the last byte (RFC 9110 §14.1.2)", () => {
    expect(parseRange("bytes=0-99", 1000)).toEqual({ start: 0, end: 99 });
    expect(parseRange("bytes=900-", 1000)).toEqual({ start: 900, end: 999 });
    expect(parseRange("bytes=-100", 1000)).toEqual({ start: 900, end: 999 });
    expect(parseRange("bytes=990-5000", 1000)).toEqual({ start: 990, end: 999 });
    expect(parseRange("bytes=-5000", 1000)).toEqual({ start: 0, end: 999 });
  });

  it("parseRange() ignores several ranges, other units and inverted ranges, serving the whole file (RFC 9110 §14.2)", () => {
    expect(parseRange(null, 10)).toBeNull();
    expect(parseRange("bytes=0-1,5-6", 10)).toBeNull();
    expect(parseRange("items=0-1", 10)).toBeNull();
    expect(parseRange("bytes=5-2", 10)).toBeNull();
  });

  it("parseRange() refuses a range that starts past the end with 416 and Content-Range bytes */size (RFC 9110 §15.5.17)", () => {
    try {
      parseRange("bytes=1000-", 1000);
      expect.unreachable();
    } catch (e) {
      expect(e).toBeInstanceOf(ApiError);
      expect((e as ApiError).kind).toBe("range-not-satisfiable");
      expect((e as ApiError).options.headers).toEqual({ "content-range": "bytes */1000" });
    }
  });
});
