import { execFileSync } from "node:child_process";
import { existsSync, mkdtempSync, readFileSync, rmSync, writeFileSync } from "node:fs";
import { tmpdir } from "node:os";
import path from "node:path";
import { afterAll, describe, expect, test } from "vitest";
import yazl from "yazl";
import { open } from "shapefile";
import { divider } from "@/lib/fractal/divider";
import { readGeoJson } from "@/lib/vector/read-geojson";
import { readShapefile, readShapefileZip } from "@/lib/vector/read-shapefile";
import { resolveLinesCrs } from "@/lib/vector/resolve-crs";
import { VectorError } from "@/lib/vector/vector-error";

const LUX = path.join(import.meta.dirname, "../../fixtures/cache/debian/lux");
const needLux = () => {
  if (!existsSync(`${LUX}.shp`)) throw new Error("tests/fixtures/cache/debian/lux.shp is missing: run `bash tests/fixtures/fetch.sh`");
};
const tmp = mkdtempSync(path.join(tmpdir(), "rillscale-shp-"));
afterAll(() => rmSync(tmp, { recursive: true, force: true }));

async function zipOf(files: Record<string, Buffer>): Promise<Buffer> {
  const zip = new yazl.ZipFile();
  for (const [name, data] of Object.entries(files)) zip.addBuffer(data, name);
  zip.end();
  const parts: Buffer[] = [];
  for await (const part of zip.outputStream as AsyncIterable<Buffer>) parts.push(part);
  return Buffer.concat(parts);
}

async function refusal(p: Promise<unknown>): Promise<VectorError> {
  try { await p; } catch (e) { if (e instanceof VectorError) return e; throw e; }
  throw new Error("expected a VectorError");
}

describe("readShapefile()", () => {
  test("refuses the polygons of lux.shp (r-cran-terra) with a clear 'not lines' error (ESRI 1998, shape type 5)", async () => {
    needLux();
    const e = await refusal(readShapefile({ shp: readFileSync(`${LUX}.shp`), dbf: readFileSync(`${LUX}.dbf`), prj: readFileSync(`${LUX}.prj`, "utf8") }));
    expect(e.code).toBe("not_lines");
    expect(e.detail).toMatch(/polygons \(shape type 5\), not lines/);
  });

  test("the boundaries of lux.shp converted to lines give a divider dimension between 1 and 1.3 (sanity range, common practice)", async () => {
    needLux();
    const source = await open(readFileSync(`${LUX}.shp`), null);
    const features: unknown[] = [];
    for (let r = await source.read(); !r.done; r = await source.read()) {
      const g = r.value.geometry!;
      const rings = g.type === "Polygon" ? (g.coordinates as number[][][]) : (g.coordinates as number[][][][]).flat();
      features.push({ type: "Feature", properties: r.value.properties, geometry: { type: "MultiLineString", coordinates: rings } });
    }
    const lines = readGeoJson({ type: "FeatureCollection", features });
    expect(lines.lines).toHaveLength(12); // the 12 cantons, one ring each
    expect(resolveLinesCrs({ kind: "prj", wkt: readFileSync(`${LUX}.prj`, "utf8") }, lines.lines).geographic).toBe(true);
    const d = divider({ lines: lines.lines, coordinates: "lonlat" });
    expect(d.dimension.value).toBeGreaterThan(1);
    expect(d.dimension.value).toBeLessThan(1.3);
  });

  test("reads a zipped PolyLine Shapefile written by GDAL, with its .prj resolved by proj4 (derived)", async () => {
    const geojson = {
      type: "FeatureCollection",
      features: [
        { type: "Feature", properties: { name: "stem", down: -1 }, geometry: { type: "LineString", coordinates: [[500000, 5000200], [500000, 5000000]] } },
        { type: "Feature", properties: { name: "trib", down: 0 }, geometry: { type: "MultiLineString", coordinates: [[[499900, 5000300], [500000, 5000200]]] } },
      ],
    };
    writeFileSync(path.join(tmp, "in.geojson"), JSON.stringify(geojson));
    execFileSync("ogr2ogr", ["-f", "ESRI Shapefile", "-a_srs", "EPSG:32632", "-nlt", "MULTILINESTRING", path.join(tmp, "rivers.shp"), path.join(tmp, "in.geojson")]);
    const zip = await zipOf(Object.fromEntries(["shp", "shx", "dbf", "prj"].map((ext) => [`data/rivers.${ext}`, readFileSync(path.join(tmp, `rivers.${ext}`))])));
    const lines = await readShapefileZip(zip);
    expect(lines.lines.map((l) => Array.from(l))).toEqual([[500000, 5000200, 500000, 5000000], [499900, 5000300, 500000, 5000200]]);
    expect(lines.properties.map((p) => p?.name)).toEqual(["stem", "trib"]);
    const crs = resolveLinesCrs(lines.crs, lines.lines);
    expect(crs.geographic).toBe(false);
    expect(crs.linearUnitToMetre).toBe(1);
    expect(crs.name).toMatch(/UTM_Zone_32N/i);
    // without the .prj the CRS is unknown and the epsg parameter is asked for
    const bare = await readShapefileZip(await zipOf({ "rivers.shp": readFileSync(path.join(tmp, "rivers.shp")), "rivers.dbf": readFileSync(path.join(tmp, "rivers.dbf")) }));
    expect(() => resolveLinesCrs(bare.crs, bare.lines)).toThrow(/`epsg` parameter/);
    expect(resolveLinesCrs(bare.crs, bare.lines, 32632).epsg).toBe(32632);
  });

  test("refuses a zip with no Shapefile, and bytes that are not a Shapefile (derived)", async () => {
    expect((await refusal(readShapefileZip(await zipOf({ "notes.txt": Buffer.from("hi") })))).code).toBe("no_shapefile");
    expect((await refusal(readShapefile({ shp: new Uint8Array(120) }))).code).toBe("bad_shapefile");
  });
});

describe("resolveLinesCrs()", () => {
  test("reads EPSG codes from crs-member URNs and refuses non-degree coordinates without a CRS (RFC 7946 §4)", () => {
    expect(resolveLinesCrs({ kind: "crs-member", name: "urn:ogc:def:crs:EPSG::3035" }, []).epsg).toBe(3035);
    expect(resolveLinesCrs({ kind: "crs-member", name: "urn:ogc:def:crs:OGC:1.3:CRS84" }, []).geographic).toBe(true);
    expect(() => resolveLinesCrs({ kind: "rfc7946" }, [Float64Array.from([500000, 5000000, 500001, 5000000])])).toThrow(/not longitude\/latitude/);
    expect(() => resolveLinesCrs({ kind: "crs-member", name: "urn:ogc:def:crs:EPSG::999999" }, [])).toThrow(VectorError);
  });
});
