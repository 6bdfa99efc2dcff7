import { describe, expect, it } from "vitest";
import { runLine, lineParamsSchema } from "@/lib/pipelines/line";
import { kochCurve } from "@/lib/fractal/synth/koch-curve";
import { expectClose } from "@/tests/helpers/expect-close";

describe("runLine()", () => {
  it("measures an RFC 7946 LineString geodesically: a straight meridian gives D = 1 by both estimators (derived)", async () => {
    const coordinates = Array.from({ length: 101 }, (_, i) => [7, 45 + i * 0.01]);
    const geojson = { type: "FeatureCollection", features: [{ type: "Feature", properties: {}, geometry: { type: "LineString", coordinates } }] };
    const { summary } = await runLine({ geojson }, { rulers: { minM: 2000, maxM: 20000 }, boxSides: { minM: 500, maxM: 30000 } });
    expect(summary.input.coordinates).toBe("lonlat");
    expect(summary.input.crs?.epsg).toBe(4326);
    const [div, box] = summary.dimensions;
    expectClose(div.D, 1, 1e-6);
    expectClose(box.D, 1, 0.05);
    expectClose(summary.input.totalLengthM, 111_100, 500); // ~1° of latitude at 45–46°N (derived, WGS84)
  });

  it("gives ln 4 / ln 3 by the divider on Koch polylines in metres (derived)", async () => {
    const { summary } = await runLine({ lines: { lines: [kochCurve(6, 81_000)], coordinates: "metres" } },
      { estimators: ["divider"], rulers: { minM: 81_000 / 3 ** 5, maxM: 81_000 / 3 }, rulerCount: 5 });
    expectClose(summary.dimensions[0].D, Math.log(4) / Math.log(3), 0.01);
  });

  it("converts projected GeoJSON in feet to metres through the stated CRS (derived)", async () => {
    // EPSG:2229 (NAD83 / California zone 5, US survey feet): a 10 000 ft straight line
    const geojson = {
      type: "FeatureCollection", crs: { type: "name", properties: { name: "urn:ogc:def:crs:EPSG::2229" } },
      features: [{ type: "Feature", properties: {}, geometry: { type: "LineString", coordinates: [[6_500_000, 1_800_000], [6_510_000, 1_800_000]] } }],
    };
    const { summary } = await runLine({ geojson }, { estimators: ["divider"], rulers: { minM: 100, maxM: 1000 } });
    expect(summary.input.coordinates).toBe("metres");
    expectClose(summary.input.totalLengthM, 10_000 * 1200 / 3937, 1e-6);
  });

  it("gives a byte-identical summary on a second run (determinism, derived)", async () => {
    const lines = { lines: [kochCurve(4, 1000)], coordinates: "metres" as const };
    const a = await runLine({ lines }, {}), b = await runLine({ lines }, {});
    expect(JSON.stringify(a.summary)).toBe(JSON.stringify(b.summary));
  });
});

describe("lineParamsSchema", () => {
  it("refuses a ruler range whose maximum is not above its minimum", () => {
    expect(lineParamsSchema.safeParse({ rulers: { minM: 10, maxM: 10 } }).success).toBe(false);
    expect(lineParamsSchema.parse({}).rulerCount).toBe(12);
  });
});
