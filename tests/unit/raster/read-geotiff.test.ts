import { describe, expect, it } from "vitest";
import { inspectGeoTiff, readDem } from "@/lib/raster/read-geotiff";
import { RasterError } from "@/lib/raster/errors";
import { expectClose } from "@/tests/helpers/expect-close";
import { baseArray, fixture, gdalInfo, gdalValues, mismatches } from "./gdal-reference";

// The variants tests/fixtures/fetch.sh makes with gdal_translate from one array (as geotiff.js builds
// its own test files); listed here so a variant that was not built fails instead of being skipped.
const compressionVariants: string[] = [];
for (const c of ["NONE", "LZW", "DEFLATE", "PACKBITS", "ZSTD"]) {
  for (const layout of ["strip", "tile"]) {
    compressionVariants.push(`f32-${c}-p1-${layout}`);
    if (c === "LZW" || c === "DEFLATE" || c === "ZSTD") {
      compressionVariants.push(`f32-${c}-p2-${layout}`, `f32-${c}-p3-${layout}`, `i16-${c}-p2-${layout}`);
    }
  }
}
for (const c of ["LERC", "LERC_DEFLATE", "LERC_ZSTD"]) compressionVariants.push(`f32-${c}-strip`, `f32-${c}-tile`);
const typeVariants: [string, string][] = [
  ["type-Int8", "Int8"], ["type-Byte", "UInt8"], ["type-Int16", "Int16"], ["type-UInt16", "UInt16"], ["type-Int32", "Int32"],
  ["type-UInt32", "UInt32"], ["type-Float32", "Float32"], ["type-Float64", "Float64"], ["type-Float64-p3", "Float64"],
];

/** The base array with its nodata (0) cells as NaN: what every variant must decode to. */
function expected(): Float32Array {
  return baseArray().map((v) => (v === 0 ? NaN : v));
}

describe("readDem() on GDAL-written variants of one array", () => {
  const want = expected();
  it.each(compressionVariants)("%s decodes to the same values as the source array (gdal_translate variants, common practice)", async (name) => {
    const dem = await readDem(fixture(`variants/${name}.tif`));
    expect(dem.elevation.width).toBe(97);
    expect(dem.elevation.height).toBe(61);
    expect(mismatches(dem.elevation.data, want)).toBe(0);
  });

  it.each(typeVariants)("%s is read as %s and decodes to the same values (gdal_translate -ot, common practice)", async (name, type) => {
    const dem = await readDem(fixture(`variants/${name}.tif`));
    expect(dem.info.dataType).toBe(type);
    expect(mismatches(dem.elevation.data, want)).toBe(0);
  });

  it("reads a BigTIFF variant like the classic one (BigTIFF layout, Aware Systems 2008)", async () => {
    const dem = await readDem(fixture("variants/bigtiff.tif"));
    expect(mismatches(dem.elevation.data, want)).toBe(0);
  });

  it.each(["f32-bigendian-NONE", "f32-bigendian-DEFLATE-p3", "i16-bigendian-LZW-p2"])(
    "big-endian %s decodes to the same values (TIFF 6.0 byte order \"MM\"; gdal_translate -co ENDIANNESS=BIG)", async (name) => {
      const dem = await readDem(fixture(`variants/${name}.tif`));
      expect(mismatches(dem.elevation.data, want)).toBe(0);
    });

  it("a sparse tile (byte count 0) reads as nodata, the written tile as its values (GDAL SPARSE_OK convention)", async () => {
    const dem = await readDem(fixture("hostile/sparse-block.tif"));
    const row = Array.from(dem.elevation.data.subarray(0, 64));
    expect(row.slice(0, 32).every((v) => v === 7)).toBe(true);
    expect(row.slice(32).every((v) => Number.isNaN(v))).toBe(true);
  });

  it("reports the compression, predictor and block layout it found (derived from the gdal_translate options)", async () => {
    const info = await inspectGeoTiff(fixture("variants/f32-ZSTD-p3-tile.tif"));
    expect([info.compression, info.predictor, info.tiled, info.tileWidth, info.tileHeight]).toEqual(["Zstd", 3, true, 32, 32]);
    const strip = await inspectGeoTiff(fixture("variants/f32-LZW-p2-strip.tif"));
    expect([strip.compression, strip.predictor, strip.tiled, strip.tileWidth]).toEqual(["LZW", 2, false, 97]);
  });
});

describe("readDem() nodata", () => {
  const want = expected();
  it.each(["nodata-9999-f32", "nodata-9999-i16"])("%s: GDAL_NODATA -9999 cells become NaN (GDAL_NODATA tag, GDAL docs)", async (name) => {
    const dem = await readDem(fixture(`variants/${name}.tif`));
    expect(dem.info.nodata).toBe(-9999);
    expect(mismatches(dem.elevation.data, want)).toBe(0);
  });
  it("GDAL_NODATA nan keeps NaN cells as nodata (GDAL docs)", async () => {
    const dem = await readDem(fixture("variants/nodata-nan-f32.tif"));
    expect(dem.info.nodata).toBeNaN();
    expect(mismatches(dem.elevation.data, want)).toBe(0);
  });
  it("without a nodata tag every cell is a value, the former nodata cells read as 0 (derived)", async () => {
    const dem = await readDem(fixture("variants/nodata-absent.tif"));
    expect(dem.info.nodata).toBeNull();
    expect(mismatches(dem.elevation.data, baseArray())).toBe(0);
  });
  it("counts 51 nodata cells in the base array (derived: a 5 × 10 block and one corner cell)", async () => {
    const dem = await readDem(fixture("variants/base.tif"));
    expect(dem.elevation.data.filter((v) => Number.isNaN(v)).length).toBe(51);
  });
});

describe("readDem() georeferencing and CRS", () => {
  it("a UTM grid has EPSG:32633, metre units and 30 m cells, as gdalinfo reports (GDAL as reference)", async () => {
    const file = fixture("variants/base.tif");
    const [dem, g] = [await readDem(file), gdalInfo(file)];
    expect(dem.georef.crs.epsg).toBe(g.epsg);
    expect(dem.georef.crs.geographic).toBe(false);
    expect(dem.georef.crs.linearUnitToMetre).toBe(1);
    expect([dem.georef.transform.originX, dem.georef.transform.originY]).toEqual([g.geoTransform[0], g.geoTransform[3]]);
    expect([dem.georef.transform.pixelSizeX, -dem.georef.transform.pixelSizeY]).toEqual([g.geoTransform[1], g.geoTransform[5]]);
    expect(dem.cellGeometry.geographic).toBe(false);
    expect(dem.cellGeometry.area[0]).toBe(900);
  });

  it("a grid in US survey feet (EPSG:2263) has 10 ftUS = 3.048006 m cells (US survey foot = 1200/3937 m, NIST)", async () => {
    const dem = await readDem(fixture("variants/crs-2263-ftus.tif"));
    expect(dem.georef.crs.epsg).toBe(2263);
    expectClose(dem.info.cellSizeM[0], 12000 / 3937, 1e-12);
    expectClose(dem.cellGeometry.dy[0], 12000 / 3937, 1e-12);
  });

  it("elevations in a US-survey-foot vertical CRS (EPSG:6360) are converted to metres (US survey foot = 1200/3937 m, NIST)", async () => {
    const dem = await readDem(fixture("variants/crs-2263-vertical-ftus.tif"));
    expect(dem.georef.crs.epsg).toBe(2263);
    const want = expected().map((v) => Math.fround(v * (1200 / 3937)));
    expect(mismatches(dem.elevation.data, want)).toBe(0);
  });

  it("a grid in international feet (EPSG:2992) has 10 ft = 3.048 m cells (international foot = 0.3048 m, NIST)", async () => {
    const dem = await readDem(fixture("variants/crs-2992-ft.tif"));
    expect(dem.georef.crs.epsg).toBe(2992);
    expectClose(dem.info.cellSizeM[0], 3.048, 1e-12);
  });

  it("a geographic grid (EPSG:4326) gets per-row WGS84 cell sizes, narrower to the north (derived)", async () => {
    const dem = await readDem(fixture("variants/crs-4326.tif"));
    expect(dem.georef.crs.geographic).toBe(true);
    expect(dem.cellGeometry.geographic).toBe(true);
    expect(dem.cellGeometry.dx[0]).toBeLessThan(dem.cellGeometry.dx[60]);
    // 0.001° of longitude at 45.03°N ≈ 78.8 m (from memory: ~78.85 km per degree at 45°)
    expectClose(dem.info.cellSizeM[0], 78.8, 0.1);
    expect(dem.info.bboxLonLat.map((v) => Number(v.toFixed(9)))).toEqual([10, 45, 10.097, 45.061]);
  });

  it("PixelIsPoint is shifted by half a cell to the corner origin GDAL reports (GeoTIFF 1.1 §7.1; GDAL as reference)", async () => {
    const file = fixture("variants/pixel-is-point.tif");
    const [dem, g] = [await readDem(file), gdalInfo(file)];
    expect(dem.georef.rasterType).toBe("PixelIsPoint");
    expectClose(dem.georef.transform.originX, g.geoTransform[0], 1e-9);
    expectClose(dem.georef.transform.originY, g.geoTransform[3], 1e-9);
  });

  it("a north-up ModelTransformation gives the origin and cell size gdalinfo reports (GeoTIFF 1.1 §7.2; GDAL as reference)", async () => {
    const file = fixture("hostile/model-transformation.tif");
    const [dem, g] = [await readDem(file), gdalInfo(file)];
    const t = dem.georef.transform;
    expect([t.originX, t.pixelSizeX, 0, t.originY, 0, -t.pixelSizeY]).toEqual(g.geoTransform);
    expect(dem.cellGeometry.area[0]).toBe(600);
  });

  it("a Mercator grid (EPSG:3857) is refused: its cell sizes in CRS units are not ground sizes (Snyder 1987, §7: scale sec φ)", async () => {
    await expect(readDem(fixture("variants/base.tif"), { epsg: 3857 })).rejects.toMatchObject({ code: "unsupported", detail: expect.stringMatching(/Mercator/) });
  });

  it("an `epsg` option supplies the CRS a file lacks (derived)", async () => {
    const dem = await readDem(fixture("hostile/crs-user-defined.tif"), { epsg: 32633 });
    expect(dem.georef.crs.name).toBe("WGS 84 / UTM zone 33N");
  });

  it("a bbox of a projected grid is its four edges in lon/lat (UTM 33N at 500 km easting is 15°E, derived)", async () => {
    const info = await inspectGeoTiff(fixture("variants/base.tif"));
    expectClose(info.bboxLonLat[0], 15, 1e-9);
    expect(info.bboxLonLat[1]).toBeGreaterThan(45);
    expect(info.bboxLonLat[3]).toBeLessThan(45.2);
  });
});

describe("readDem() options", () => {
  it.each(["bands-3", "bands-3-planar"])("%s: several bands need a band choice, and band k reads k × the base values (gdal_translate -scale_k, derived)", async (name) => {
    const file = fixture(`variants/${name}.tif`);
    await expect(readDem(file)).rejects.toMatchObject({ code: "band-required" });
    for (const band of [1, 2, 3]) {
      const dem = await readDem(file, { band });
      expect(mismatches(dem.elevation.data, expected().map((v) => v * band))).toBe(0);
    }
    await expect(readDem(file, { band: 4 })).rejects.toMatchObject({ code: "band-required" });
  });

  it.each([0, -1, Number.NaN, Number.POSITIVE_INFINITY])("zFactor %s is refused: it must be finite and positive (derived: a negative one flips the terrain)", async (zFactor) => {
    await expect(readDem(fixture("variants/base.tif"), { zFactor })).rejects.toThrow(/zFactor must be a finite positive number/);
  });

  it("zFactor scales every elevation and leaves nodata NaN (derived)", async () => {
    const dem = await readDem(fixture("variants/base.tif"), { zFactor: 0.5 });
    expect(mismatches(dem.elevation.data, expected().map((v) => v * 0.5))).toBe(0);
  });

  it("a cell budget below the declared size refuses the file before reading pixels (derived)", async () => {
    await expect(readDem(fixture("variants/base.tif"), { cellBudget: 97 * 61 - 1 })).rejects.toMatchObject({ code: "too-large" });
    await expect(readDem(fixture("variants/base.tif"), { cellBudget: 97 * 61 })).resolves.toBeTruthy();
  });

  it("an aborted signal stops the read with an 'aborted' error (derived)", async () => {
    const ac = new AbortController();
    ac.abort();
    await expect(readDem(fixture("variants/base.tif"), { signal: ac.signal })).rejects.toMatchObject({ code: "aborted" });
  });

  it("inspectGeoTiff() reports size and georeferencing without pixels (derived)", async () => {
    const info = await inspectGeoTiff(fixture("variants/type-Int32.tif"));
    expect([info.width, info.height, info.bands, info.dataType, info.nodata]).toEqual([97, 61, 1, "Int32", 0]);
    expect(info.georef.crs.epsg).toBe(32633);
    expect("elevation" in info).toBe(false);
  });
});

describe("readDem() on real DEMs from Debian packages", () => {
  it("elev.tif (r-cran-terra) matches gdalinfo in size, CRS and geotransform, and GDAL's decoded values and nodata cells", async () => {
    const file = fixture("debian/elev.tif");
    const [dem, g, values] = [await readDem(file), gdalInfo(file), gdalValues(file)];
    expect([dem.elevation.width, dem.elevation.height]).toEqual(g.size);
    expect(dem.georef.crs.epsg).toBe(4326);
    expect(dem.info.nodata).toBe(g.noData);
    expectClose(dem.georef.transform.originX, g.geoTransform[0], 1e-12);
    expectClose(dem.georef.transform.originY, g.geoTransform[3], 1e-12);
    expectClose(dem.georef.transform.pixelSizeX, g.geoTransform[1], 1e-15);
    expectClose(dem.georef.transform.pixelSizeY, -g.geoTransform[5], 1e-15);
    expect(mismatches(dem.elevation.data, values)).toBe(0);
    const nodataCells = values.filter((v) => Number.isNaN(v)).length;
    expect(nodataCells).toBeGreaterThan(0);
    expect(dem.elevation.data.filter((v) => Number.isNaN(v)).length).toBe(nodataCells);
    expectClose(dem.info.bboxLonLat[0], g.corners.upperLeft[0], 1e-6);
    expectClose(dem.info.bboxLonLat[3], g.corners.upperLeft[1], 1e-6);
    expectClose(dem.info.bboxLonLat[2], g.corners.lowerRight[0], 1e-6);
    expectClose(dem.info.bboxLonLat[1], g.corners.lowerRight[1], 1e-6);
  });

  it("the Jacksboro DEM (python-matplotlib-data) has 403 × 344 cells of 0.00083333° from -84.41375°E, 36.7329167°N (the .npz's dx, xmin, ymin) and GDAL's values", async () => {
    const file = fixture("debian/jacksboro.tif");
    const [dem, g] = [await readDem(file), gdalInfo(file)];
    expect([dem.elevation.width, dem.elevation.height]).toEqual([403, 344]);
    expect([dem.elevation.width, dem.elevation.height]).toEqual(g.size);
    expectClose(dem.georef.transform.originX, -84.41375, 1e-9);
    expectClose(dem.georef.transform.originY, 36.73291666666667, 1e-9);
    expectClose(dem.georef.transform.pixelSizeX, 0.0008333333333333334, 1e-12);
    expectClose(dem.georef.transform.originX, g.geoTransform[0], 1e-12);
    expectClose(dem.georef.transform.originY, g.geoTransform[3], 1e-12);
    expect(mismatches(dem.elevation.data, gdalValues(file))).toBe(0);
    // 3″ cells at 36.6°N: about 74.6 m wide and 92.5 m tall (derived from the WGS84 radii of curvature)
    expectClose(dem.info.cellSizeM[0], 74.57, 0.01);
    expectClose(dem.info.cellSizeM[1], 92.48, 0.01);
  });
});

describe("RasterError", () => {
  it("carries a code and the detail the API puts in its problem document (derived)", async () => {
    const err = await readDem(fixture("hostile/crs-absent.tif")).catch((e: unknown) => e);
    expect(err).toBeInstanceOf(RasterError);
    expect((err as RasterError).code).toBe("crs-missing");
    expect((err as RasterError).detail).toMatch(/epsg/);
  });
});
