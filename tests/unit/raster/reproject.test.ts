import { describe, it } from "vitest";
import { lonLatTransformer } from "@/lib/raster/reproject";
import { crsFromEpsg } from "@/lib/raster/crs";
import { expectClose } from "@/tests/helpers/expect-close";

describe("lonLatTransformer()", () => {
  it("maps the UTM 33N false origin (500000, 0) to 15°E on the equator (derived from the zone definition)", () => {
    const [lon, lat] = lonLatTransformer(crsFromEpsg(32633))(500000, 0);
    expectClose(lon, 15, 1e-9);
    expectClose(lat, 0, 1e-9);
  });
  it("maps EPSG:2263's false origin (984250 ftUS, 0) to 74°W, 40.1666667°N (derived from its definition)", () => {
    const [lon, lat] = lonLatTransformer(crsFromEpsg(2263))(984250, 0);
    expectClose(lon, -74, 1e-7);
    expectClose(lat, 40.1666666666667, 1e-7);
  });
  it("leaves WGS 84 lon/lat unchanged (invariant)", () => {
    const [lon, lat] = lonLatTransformer(crsFromEpsg(4326))(6.1, 49.8);
    expectClose(lon, 6.1, 0);
    expectClose(lat, 49.8, 0);
  });
  it("a CRS whose datum-shift grid proj4js lacks converts on its ellipsoid: EPSG:27700's origin to 2°W, 49°N (derived from its definition)", () => {
    const [lon, lat] = lonLatTransformer(crsFromEpsg(27700))(400000, -100000);
    expectClose(lon, -2, 1e-9);
    expectClose(lat, 49, 1e-9);
  });
});
