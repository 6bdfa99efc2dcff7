import { afterAll, describe, expect, it } from "vitest";
import { mkdtempSync, readdirSync, rmSync } from "node:fs";
import { tmpdir } from "node:os";
import path from "node:path";
import { writeGeoTiff } from "@/lib/raster/write-geotiff";
import { readDem, type Georeference } from "@/lib/raster/read-geotiff";
import { crsFromEpsg } from "@/lib/raster/crs";
import { makeGrid } from "@/lib/raster/grid";
import { expectClose } from "@/tests/helpers/expect-close";
import { fixture, gdalInfo, gdalValues, mismatches } from "./gdal-reference";

const dir = mkdtempSync(path.join(tmpdir(), "rillscale-write-"));
afterAll(() => rmSync(dir, { recursive: true, force: true }));

const utm: Georeference = {
  crs: crsFromEpsg(32633),
  transform: { originX: 500000, originY: 5001830, pixelSizeX: 30, pixelSizeY: 20 },
  rasterType: "PixelIsArea",
};
const W = 37, H = 23;

describe("writeGeoTiff() read back by GDAL (gdalinfo, gdal_translate as reference)", () => {
  it.each([
    ["Float32", () => new Float32Array(W * H).map((_, i) => (i % 11 === 0 ? NaN : i * 0.25)), undefined, "Float32"],
    ["Float64", () => new Float64Array(W * H).map((_, i) => i / 3), undefined, "Float64"],
    ["Int32", () => new Int32Array(W * H).map((_, i) => (i % 5) - 1), -1, "Int32"],
    ["Uint8", () => new Uint8Array(W * H).map((_, i) => i % 7), 0, "Byte"],
  ] as const)("%s: size, EPSG, geotransform, nodata and every value survive", async (name, make, nodata, gdalType) => {
    const data = make();
    const file = path.join(dir, `${name}.tif`);
    await writeGeoTiff(file, makeGrid(data, W, H), utm, nodata === undefined ? {} : { nodata });
    const g = gdalInfo(file);
    expect(g.size).toEqual([W, H]);
    expect(g.epsg).toBe(32633);
    expect(g.type).toBe(gdalType);
    expect(g.geoTransform).toEqual([500000, 30, 0, 5001830, 0, -20]);
    if (nodata === undefined) expect(g.noData).toBeNaN(); else expect(g.noData).toBe(nodata);
    const want = Float64Array.from(data, (v) => (v === nodata ? NaN : v));
    const got = gdalValues(file);
    // the ASCII grid prints floats rounded; integers exactly
    if (name.startsWith("Float")) {
      for (let i = 0; i < want.length; i++) if (!Number.isNaN(want[i])) expectClose(got[i], want[i], 1e-6 * Math.max(1, want[i]));
      expect(got.filter((v) => Number.isNaN(v)).length).toBe(want.filter((v) => Number.isNaN(v)).length);
    } else {
      expect(mismatches(got, want)).toBe(0);
    }
  });

  it("a DEM read, written and read again keeps its values and georeferencing (elev.tif, r-cran-terra; invariant)", async () => {
    const dem = await readDem(fixture("debian/elev.tif"));
    const file = path.join(dir, "elev-copy.tif");
    await writeGeoTiff(file, dem.elevation, dem.georef);
    const back = await readDem(file);
    expect(mismatches(back.elevation.data, dem.elevation.data)).toBe(0);
    expect(back.georef).toEqual(dem.georef);
    expect(gdalInfo(file).epsg).toBe(4326);
  });

  it("a foot-based CRS keeps its EPSG code (EPSG:2263; GDAL as reference)", async () => {
    const dem = await readDem(fixture("variants/crs-2263-ftus.tif"));
    const file = path.join(dir, "ftus.tif");
    await writeGeoTiff(file, dem.elevation, dem.georef);
    expect(gdalInfo(file).epsg).toBe(2263);
  });

  it("leaves no temporary file behind, and none at all when the write fails (derived)", async () => {
    const before = readdirSync(dir).length;
    await writeGeoTiff(path.join(dir, "atomic.tif"), makeGrid(new Float32Array(4), 2, 2), utm);
    expect(readdirSync(dir).length).toBe(before + 1);
    await expect(writeGeoTiff(path.join(dir, "missing-dir", "x.tif"), makeGrid(new Float32Array(4), 2, 2), utm)).rejects.toThrow();
    expect(readdirSync(dir).length).toBe(before + 1);
  });

  it("refuses a CRS without an EPSG code it cannot name (derived)", async () => {
    const custom: Georeference = { ...utm, crs: { epsg: null, name: "custom", proj4: "+proj=tmerc +lon_0=3 +ellps=GRS80", geographic: false, linearUnitToMetre: 1 } };
    await expect(writeGeoTiff(path.join(dir, "custom.tif"), makeGrid(new Float32Array(4), 2, 2), custom)).rejects.toThrow(RangeError);
  });
});
