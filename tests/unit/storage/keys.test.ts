import { describe, expect, it } from "vitest";
import { artifactKey, assertKeyPrefix, assertObjectKey, contentKey, InvalidObjectKeyError } from "@/lib/storage/keys";

// SHA-256 of the empty string (FIPS 180-4 test vector, NIST examples).
const EMPTY_SHA256 = "e3b0c44298fc1c149afbf4c8996fb92427ae41e4649b934ca495991b7852b855";

describe("contentKey()", () => {
  it("fans a dataset hash out as datasets/ab/cd/<sha256> (derived)", () => {
    expect(contentKey(EMPTY_SHA256, "datasets")).toBe(`datasets/e3/b0/${EMPTY_SHA256}`);
  });

  it("refuses anything but 64 lowercase hex digits and a one-segment kind (derived)", () => {
    expect(() => contentKey(EMPTY_SHA256.toUpperCase(), "datasets")).toThrow(RangeError);
    expect(() => contentKey(EMPTY_SHA256.slice(1), "datasets")).toThrow(RangeError);
    expect(() => contentKey(EMPTY_SHA256, "a/b")).toThrow(InvalidObjectKeyError);
    expect(() => contentKey(EMPTY_SHA256, "..")).toThrow(InvalidObjectKeyError);
  });
});

describe("artifactKey()", () => {
  it("puts a job's artifact under jobs/<id>/<name> (derived)", () => {
    expect(artifactKey("0b7c0e2e-5d3e-4f5a-9a55-1f2b3c4d5e6f", "network.geojson"))
      .toBe("jobs/0b7c0e2e-5d3e-4f5a-9a55-1f2b3c4d5e6f/network.geojson");
  });

  it("refuses names that would leave the job's folder (derived)", () => {
    for (const name of ["../other/x", "a/b", "..", ".tmp"]) expect(() => artifactKey("j1", name), name).toThrow(InvalidObjectKeyError);
    expect(() => artifactKey("j1/..", "x")).toThrow(InvalidObjectKeyError);
  });
});

describe("assertObjectKey()", () => {
  it("accepts the safe alphabet and refuses traversal, absolute, hidden, empty and over-long keys (S3 key naming guidelines)", () => {
    for (const ok of ["a", "a/b.c", "jobs/x_1/fit-points.csv", "A9/x..y"]) expect(() => assertObjectKey(ok), ok).not.toThrow();
    for (const bad of ["", "..", ".", "a/../b", "/a", "a/", "a//b", ".git", "a\u0000b", "ä", "a b", "x".repeat(1025)]) {
      expect(() => assertObjectKey(bad), JSON.stringify(bad)).toThrow(InvalidObjectKeyError);
    }
  });

  it("a list prefix may be empty or end with a slash, and obeys the same alphabet (derived)", () => {
    for (const ok of ["", "jobs/", "datasets/ab"]) expect(() => assertKeyPrefix(ok), ok).not.toThrow();
    for (const bad of ["../", "/", "a//"]) expect(() => assertKeyPrefix(bad), bad).toThrow(InvalidObjectKeyError);
  });
});
