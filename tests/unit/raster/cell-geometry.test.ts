import { describe, expect, it } from "vitest";
import geodesicModule from "geographiclib-geodesic";
import { geographicCellGeometry, projectedCellGeometry } from "@/lib/raster/cell-geometry";
import { geodesicDistance } from "@/lib/raster/geodesy";
import { WGS84_A } from "@/lib/raster/wgs84";
import { expectClose } from "@/tests/helpers/expect-close";

const { Geodesic } = geodesicModule as unknown as {
  Geodesic: { WGS84: { Polygon(polyline: boolean): { AddPoint(lat: number, lon: number): void; Compute(reverse: boolean, sign: boolean): { area: number } } } };
};

describe("geographicCellGeometry() areas (Snyder 1987, eq. 3-12)", () => {
  it("gives 12,308,463,893.975 m² for the 1° × 1° cell from 0° to 1°N (METHODS.md)", () => {
    expectClose(geographicCellGeometry(1, 1, 1, 1).area[0], 12_308_463_893.975, 1e-3);
  });
  it("gives 8,686,494,956.670 m² for the 1° × 1° cell from 45° to 46°N (METHODS.md)", () => {
    expectClose(geographicCellGeometry(1, 46, 1, 1).area[0], 8_686_494_956.67, 1e-3);
  });
  it("gives 949.774080 m² for the 1″ × 1″ cell at the equator (METHODS.md)", () => {
    expectClose(geographicCellGeometry(1, 1 / 3600, 1 / 3600, 1 / 3600).area[0], 949.77408, 1e-6);
  });
  it("1°-rows from the pole to the equator, times 360, add up to the hemisphere geographiclib gives (Karney 2013; invariant)", () => {
    const g = geographicCellGeometry(90, 90, 1, 1);
    const hemisphere = g.area.reduce((s, a) => s + a, 0) * 360;
    const ring = Geodesic.WGS84.Polygon(false);
    for (const lon of [0, 90, 180, 270]) ring.AddPoint(0, lon);
    expectClose(hemisphere / ring.Compute(false, true).area, 1, 1e-12);
  });
  it("is symmetric about the equator (invariant)", () => {
    const g = geographicCellGeometry(4, 2, 0.5, 1);
    expectClose(g.area[0] / g.area[3], 1, 1e-13);
    expectClose(g.dx[1] / g.dx[2], 1, 1e-13);
  });
});

describe("geographicCellGeometry() lengths against geographiclib-geodesic (Karney 2013)", () => {
  it("row heights equal the meridian geodesic between the row's edges, on 1° and 3″ rows (to 1 µm)", () => {
    const coarse = geographicCellGeometry(90, 90, 1, 1);
    for (let r = 0; r < 90; r++) expectClose(coarse.dy[r], geodesicDistance(0, 90 - r - 1, 0, 90 - r), 1e-6);
    const d = 1 / 1200;
    const fine = geographicCellGeometry(20, 36.75, d, d);
    for (let r = 0; r < 20; r++) expectClose(fine.dy[r], geodesicDistance(0, 36.75 - (r + 1) * d, 0, 36.75 - r * d), 1e-6);
  });
  it("row heights from the pole to the equator add up to the quarter meridian, 10,001,965.729 m (geographiclib; invariant)", () => {
    const g = geographicCellGeometry(900, 90, 0.1, 0.1);
    expectClose(g.dy.reduce((s, v) => s + v, 0), geodesicDistance(0, 0, 0, 90), 1e-5);
  });
  it("row widths on a 3″ grid equal the geodesic between neighbouring cell centres (to 1 µm)", () => {
    const d = 1 / 1200;
    const g = geographicCellGeometry(400, 60, d, d);
    for (const r of [0, 199, 399]) {
      const lat = 60 - (r + 0.5) * d;
      expectClose(g.dx[r], geodesicDistance(0, lat, d, lat), 1e-6);
    }
  });
  it("a 1° row centred on the equator is a·π/180 wide (derived)", () => {
    expectClose(geographicCellGeometry(1, 0.5, 1, 1).dx[0], (WGS84_A * Math.PI) / 180, 1e-6);
  });
  it("refuses rows beyond the poles and non-positive cell sizes with a RangeError (derived)", () => {
    expect(() => geographicCellGeometry(10, 85, 1, 1)).not.toThrow();
    expect(() => geographicCellGeometry(200, 90, 1, 1)).toThrow(RangeError);
    expect(() => geographicCellGeometry(1, 10, 0, 1)).toThrow(RangeError);
  });
});

describe("projectedCellGeometry()", () => {
  it("gives every row the same dx, dy and dx·dy area (derived)", () => {
    const g = projectedCellGeometry(3, 30, 20);
    expect(Array.from(g.area)).toEqual([600, 600, 600]);
    expect(g.geographic).toBe(false);
  });
});
