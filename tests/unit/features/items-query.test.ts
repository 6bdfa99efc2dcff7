import { describe, expect, it } from "vitest";
import { ApiError } from "@/lib/api/problem";
import { DEFAULT_LIMIT, MAX_LIMIT, encodeItemsCursor, parseBbox, parseItemsQuery } from "@/lib/features/items-query";

const q = (s: string) => parseItemsQuery(new URLSearchParams(s));
const status400 = (f: () => unknown, pointer: string) => {
  try {
    f();
  } catch (e) {
    expect(e).toBeInstanceOf(ApiError);
    expect((e as ApiError).kind).toBe("bad-request");
    expect((e as ApiError).options.errors?.map((x) => x.pointer)).toContain(pointer);
    return;
  }
  throw new Error("expected a 400");
};

describe("parseItemsQuery()", () => {
  it("parseItemsQuery() without parameters gives limit 10, no bbox, no cursor, no order (OGC 17-069r4 §7.15.2)", () => {
    expect(q("")).toEqual({ limit: DEFAULT_LIMIT, envelopes: null, after: null, order: null });
    expect(DEFAULT_LIMIT).toBe(10);
  });

  it("parseItemsQuery() accepts limit 1 and 10000 and refuses 0, 10001, 2.5 and words (STANDARDS.md: limit 1–10000)", () => {
    expect(q("limit=1").limit).toBe(1);
    expect(q(`limit=${MAX_LIMIT}`).limit).toBe(10_000);
    for (const bad of ["0", "10001", "2.5", "ten", "-3", ""]) status400(() => q(`limit=${bad}`), "/limit");
  });

  it("parseItemsQuery() refuses unknown and repeated parameters with 400 (OGC 17-069r4 /req/core/query-param-unknown)", () => {
    status400(() => q("colour=blue"), "/colour");
    status400(() => q("limit=5&limit=6"), "/limit");
  });

  it("parseItemsQuery() reads a cursor it wrote back as the same feature id, and refuses a forged one (derived)", () => {
    expect(q(`cursor=${encodeItemsCursor(41)}`).after).toBe(41);
    status400(() => q("cursor=bm90LWEtY3Vyc29y"), "/cursor");
    status400(() => q(`cursor=${Buffer.from("after:-1").toString("base64url")}`), "/cursor");
  });

  it("parseItemsQuery() filters on a Strahler order from 1 and refuses 0 (derived: orders start at 1, Strahler 1957)", () => {
    expect(q("order=3").order).toBe(3);
    status400(() => q("order=0"), "/order");
    status400(() => q("order=x"), "/order");
  });
});

describe("parseBbox()", () => {
  it("parseBbox() reads minLon,minLat,maxLon,maxLat in CRS84 and drops the heights of the 6-number form (OGC 17-069r4 §7.15.3)", () => {
    expect(parseBbox("5.8,49.4,6.6,50.2")).toEqual([{ west: 5.8, south: 49.4, east: 6.6, north: 50.2 }]);
    expect(parseBbox("5.8,49.4,-10,6.6,50.2,900")).toEqual([{ west: 5.8, south: 49.4, east: 6.6, north: 50.2 }]);
  });

  it("parseBbox() splits a box whose west edge lies east of its east edge at the antimeridian (OGC 17-069r4 §7.15.3)", () => {
    const parts = parseBbox("170,-10,-170,10");
    expect(parts).toEqual([{ west: 170, south: -10, east: 180, north: 10 }, { west: -180, south: -10, east: -170, north: 10 }]);
    // invariant: the two parts together span the same 20° of longitude
    expect(parts.reduce((s, p) => s + (p.east - p.west), 0)).toBe(20);
  });

  it("parseBbox() refuses 3 numbers, words, latitudes past ±90, longitudes past ±180 and south above north (common practice)", () => {
    for (const bad of ["1,2,3", "a,b,c,d", "0,-91,1,1", "0,0,181,1", "0,10,1,5", "0,,1,1"]) status400(() => parseBbox(bad), "/bbox");
  });
});
