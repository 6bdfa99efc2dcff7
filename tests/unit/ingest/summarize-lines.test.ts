import { describe, expect, it } from "vitest";
import { expectClose } from "@/tests/helpers/expect-close";
import { summarizeLines } from "@/lib/ingest/summarize-lines";
import { crsFromEpsg } from "@/lib/raster/crs";
import type { VectorLines } from "@/lib/vector/read-geojson";
import { VectorError } from "@/lib/vector/vector-error";

function lines(...coords: number[][]): VectorLines {
  return {
    lines: coords.map((c) => Float64Array.from(c)),
    featureOf: Int32Array.from(coords.map((_, i) => i)),
    properties: coords.map(() => null),
    crs: { kind: "rfc7946" },
    skipped: { nullGeometry: 0, degenerateLines: 0 },
  };
}

describe("summarizeLines()", () => {
  it("counts features, lines and vertices and takes the lon/lat box of WGS 84 lines as they are (derived)", () => {
    const s = summarizeLines(lines([10, 50, 10.5, 50.2, 11, 50.1], [9.5, 49.9, 10, 50]), crsFromEpsg(4326));
    expect(s).toMatchObject({ featureCount: 2, lineCount: 2, vertexCount: 5, crs: { epsg: 4326, geographic: true } });
    expect(s.bboxLonLat).toEqual([9.5, 49.9, 11, 50.2]);
  });

  it("converts projected lines: UTM 33N easting 500 000 m on the equator is 15°E, 0°N (UTM central meridian, NGA TM 8358.2)", () => {
    const s = summarizeLines(lines([500_000, 0, 500_000, 100]), crsFromEpsg(32633));
    expectClose(s.bboxLonLat[0], 15, 1e-9);
    expectClose(s.bboxLonLat[1], 0, 1e-9);
    expectClose(s.bboxLonLat[2], 15, 1e-9);
    // Northing 100 m on the central meridian = 100 / k0 m of meridian (k0 = 0.9996); the WGS 84 meridian arc at the
    // equator is a(1 − e²)·π/180 = 110 574.27 m per degree (derived).
    expectClose(s.bboxLonLat[3], 100 / 0.9996 / 110_574.27, 1e-8);
  });

  it("refuses a file without any usable line (derived)", () => {
    expect(() => summarizeLines(lines(), crsFromEpsg(4326))).toThrow(VectorError);
  });
});
