import { describe, expect, it } from "vitest";
import { readFileSync } from "node:fs";
import { createRequire } from "node:module";
import { feature } from "topojson-client";
import type { Topology } from "topojson-specification";
import type { MultiPolygon } from "geojson";
import { divider } from "@/lib/fractal/divider";
import { kochCurve } from "@/lib/fractal/synth/koch-curve";
import { expectClose } from "@/tests/helpers/expect-close";

/** The largest ring (by planar lon/lat area) of the United Kingdom in Natural Earth 1:10m: the island of Great Britain. */
function greatBritain(): Float64Array {
  const require = createRequire(import.meta.url);
  const topo = JSON.parse(readFileSync(require.resolve("world-atlas/countries-10m.json"), "utf8")) as Topology;
  const countries = feature(topo, topo.objects.countries) as unknown as GeoJSON.FeatureCollection<MultiPolygon, { name: string }>;
  const uk = countries.features.find((f) => f.properties.name === "United Kingdom")!;
  const area = (ring: number[][]) => Math.abs(ring.reduce((s, p, i) => {
    const q = ring[(i + 1) % ring.length];
    return s + p[0] * q[1] - q[0] * p[1];
  }, 0) / 2);
  const rings = uk.geometry.coordinates.map((polygon) => polygon[0]);
  rings.sort((a, b) => area(b) - area(a));
  return Float64Array.from(rings[0].flat());
}

describe("divider()", () => {
  it("gives ln 4 / ln 3 within 0.01 on a level-7 Koch curve with rulers 3^−j (derived)", () => {
    const r = divider({ lines: [kochCurve(7)], coordinates: "metres" }, { rulers: [1, 2, 3, 4, 5, 6].map((j) => 3 ** -j) });
    expectClose(r.dimension.value, Math.log(4) / Math.log(3), 0.01);
    expect(r.steps).toEqual([4, 16, 64, 256, 1024, 4096]); // chords land on the level-j vertices (derived)
  });

  it("gives D = 1 on a straight segment, with the leftover rule making L(G) the segment's length (derived)", () => {
    const r = divider({ lines: [Float64Array.of(0, 0, 300, 400, 600, 800)], coordinates: "metres" }, { rulers: [7, 30, 110, 240] });
    for (const l of r.length) expectClose(l, 1000, 1e-9);
    expectClose(r.dimension.value, 1, 1e-12);
    expect(r.steps).toEqual([142, 33, 9, 4]);
  });

  it("ends a chord where it crosses the polyline, not at a vertex (derived)", () => {
    // a right angle of two 10 m legs: a 12 m chord from (0,0) passes the corner (10 m away) and meets the
    // second leg at (10, √44); vertex hopping would stop at the corner instead
    const r = divider({ lines: [Float64Array.of(0, 0, 10, 0, 10, 10)], coordinates: "metres" }, { rulers: [12, 13, 14, 15] });
    expect(r.steps[0]).toBe(1);
    expectClose(r.leftover[0] * 12, 10 - Math.sqrt(44), 1e-9);
  });

  it("measures lon/lat lines geodesically: one degree of the equator at 1 km rulers is a·π/180 (derived)", () => {
    const r = divider({ lines: [Float64Array.of(0, 0, 0.5, 0, 1, 0)], coordinates: "lonlat" }, { rulers: [1000, 2000, 5000, 10000] });
    for (const l of r.length) expectClose(l, (6378137 * Math.PI) / 180, 1e-3);
  });

  it("gives D = 1.25 ± 0.05 on the coast of Great Britain (Natural Earth 1:10m) with rulers 5–200 km (Richardson 1961 as analysed by Mandelbrot 1967)", () => {
    const rulers = Array.from({ length: 10 }, (_, i) => 5000 * 40 ** (i / 9));
    const r = divider({ lines: [greatBritain()], coordinates: "lonlat" }, { rulers, range: { min: 5000, max: 200000 } });
    expectClose(r.dimension.value, 1.25, 0.05);
    expect(r.fit.n).toBe(10);
  });

  it("rejects a non-positive ruler", () => {
    expect(() => divider({ lines: [Float64Array.of(0, 0, 1, 1)], coordinates: "metres" }, { rulers: [0, 1] })).toThrow(RangeError);
  });
});
