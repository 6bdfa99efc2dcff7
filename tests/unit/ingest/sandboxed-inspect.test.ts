import { mkdtempSync, rmSync, writeFileSync } from "node:fs";
import { tmpdir } from "node:os";
import path from "node:path";
import { Readable } from "node:stream";
import { ZipFile } from "yazl";
import { afterAll, describe, expect, it } from "vitest";
import { expectClose } from "@/tests/helpers/expect-close";
import { InspectionFailedError, inspectUpload } from "@/lib/ingest/sandboxed-inspect";
import { crsFromEpsg } from "@/lib/raster/crs";
import { makeGrid } from "@/lib/raster/grid";
import { writeGeoTiff } from "@/lib/raster/write-geotiff";

const dir = mkdtempSync(path.join(tmpdir(), "rillscale-inspect-"));
afterAll(() => rmSync(dir, { recursive: true, force: true }));

/** Writes bytes to a file in the test's temp dir and returns its path. */
function file(name: string, bytes: Uint8Array | string): string {
  const p = path.join(dir, name);
  writeFileSync(p, bytes);
  return p;
}

/** A little-endian TIFF whose two image directories point at each other (TIFF 6.0 §2: each IFD ends with the
 *  offset of the next; 0 ends the chain). Each IFD holds ImageWidth = 1 and ImageLength = 1 only. */
function ifdLoopTiff(): Buffer {
  const b = Buffer.alloc(8 + 2 * 30);
  b.write("II", 0, "latin1");
  b.writeUInt16LE(42, 2);
  b.writeUInt32LE(8, 4);
  for (const [at, next] of [[8, 38], [38, 8]]) {
    b.writeUInt16LE(2, at); // two entries
    for (const [i, tag] of [256, 257].entries()) {
      const e = at + 2 + i * 12;
      b.writeUInt16LE(tag, e);
      b.writeUInt16LE(3, e + 2); // SHORT
      b.writeUInt32LE(1, e + 4);
      b.writeUInt16LE(1, e + 8);
    }
    b.writeUInt32LE(next, at + 26);
  }
  return b;
}

/** A TIFF declaring 10⁶ × 10⁶ cells (LONG ImageWidth/ImageLength) and nothing else: 12 bytes of promise. */
function absurdSizeTiff(): Buffer {
  const b = Buffer.alloc(8 + 2 + 2 * 12 + 4);
  b.write("II", 0, "latin1");
  b.writeUInt16LE(42, 2);
  b.writeUInt32LE(8, 4);
  b.writeUInt16LE(2, 8);
  for (const [i, tag] of [256, 257].entries()) {
    const e = 10 + i * 12;
    b.writeUInt16LE(tag, e);
    b.writeUInt16LE(4, e + 2); // LONG
    b.writeUInt32LE(1, e + 4);
    b.writeUInt32LE(1_000_000, e + 8);
  }
  return b;
}

async function zipOf(entries: Record<string, string | Readable>): Promise<Buffer> {
  const zip = new ZipFile();
  for (const [name, body] of Object.entries(entries)) {
    if (typeof body === "string") zip.addBuffer(Buffer.from(body), name);
    else zip.addReadStream(body, name);
  }
  zip.end();
  const chunks: Buffer[] = [];
  for await (const c of zip.outputStream) chunks.push(c as Buffer);
  return Buffer.concat(chunks);
}

const refusal = (p: Promise<unknown>) => p.then(() => { throw new Error("expected a refusal"); }, (e: unknown) => e as InspectionFailedError);

describe("inspectUpload()", () => {
  it("reads a GeoTIFF's metadata in the child: size, CRS, bbox, data type, nodata (derived from the written file)", async () => {
    const tif = path.join(dir, "dem.tif");
    const grid = makeGrid(Float32Array.from([1, 2, 3, 4, 5, 6, 7, 8, 9, 10, 11, -9999]), 4, 3);
    await writeGeoTiff(tif, grid, {
      crs: crsFromEpsg(4326), rasterType: "PixelIsArea",
      transform: { originX: 10, originY: 50, pixelSizeX: 0.01, pixelSizeY: 0.01 },
    }, { nodata: -9999 });
    const { inspection, format } = await inspectUpload(tif, { declaredKind: "geotiff", filename: "dem.tif" });
    expect(format).toBe("tiff");
    if (inspection.kind !== "geotiff") throw new Error(`expected a raster inspection, got ${inspection.kind}`);
    const r = inspection.raster;
    expect(r).toMatchObject({ width: 4, height: 3, dataType: "Float32", nodata: -9999 });
    expect(r.georef.crs.epsg).toBe(4326);
    const [w, s, e, n] = r.bboxLonLat;
    expectClose(w, 10, 1e-9);
    expectClose(e, 10.04, 1e-9);
    expectClose(s, 49.97, 1e-9);
    expectClose(n, 50, 1e-9);
  });

  it("reads GeoJSON lines: feature, line and vertex counts and the lon/lat box (RFC 7946)", async () => {
    const geojson = file("streams.geojson", JSON.stringify({
      type: "FeatureCollection",
      features: [
        { type: "Feature", properties: { name: "Tallow Creek" }, geometry: { type: "LineString", coordinates: [[-1.5, 52], [-1.4, 52.1], [-1.3, 52.1]] } },
        { type: "Feature", properties: null, geometry: { type: "MultiLineString", coordinates: [[[-1.6, 51.9], [-1.5, 52]], [[-1.45, 52.2], [-1.4, 52.1]]] } },
      ],
    }));
    const { inspection } = await inspectUpload(geojson, { declaredKind: "geojson" });
    if (inspection.kind === "geotiff") throw new Error("expected a lines inspection");
    expect(inspection.lines).toMatchObject({ featureCount: 2, lineCount: 3, vertexCount: 7, crs: { epsg: 4326 } });
    expect(inspection.lines.bboxLonLat).toEqual([-1.6, 51.9, -1.3, 52.2]);
  });

  it("a TIFF whose directory chain loops is refused with a typed error in seconds (TIFF 6.0 §2; regression: IFD loop)", async () => {
    const started = performance.now();
    const err = await refusal(inspectUpload(file("loop.tif", ifdLoopTiff()), { declaredKind: "geotiff" }));
    expect(err).toBeInstanceOf(InspectionFailedError);
    expect(err.code).toBe("corrupt");
    expect(err.detail).toMatch(/loop/);
    expect(performance.now() - started).toBeLessThan(10_000);
  });

  it("PNG bytes named .tif get format_mismatch naming PNG, before any child is started (PNG spec §5.2)", async () => {
    const png = Buffer.from([0x89, 0x50, 0x4e, 0x47, 0x0d, 0x0a, 0x1a, 0x0a, 0, 0, 0, 13, 0x49, 0x48, 0x44, 0x52]);
    const started = performance.now();
    const err = await refusal(inspectUpload(file("photo.tif", png), { declaredKind: "geotiff", filename: "photo.tif" }));
    expect(err).toBeInstanceOf(InspectionFailedError);
    expect(err.code).toBe("format_mismatch");
    expect(err.detail).toBe('the file "photo.tif" was sent as a GeoTIFF but its bytes are a PNG image');
    expect(performance.now() - started).toBeLessThan(500); // no process spawned (derived)
    const undeclared = await refusal(inspectUpload(file("photo.bin", png)));
    expect(undeclared.code).toBe("unsupported_format");
  });

  it("a zip goes to the Shapefile reader, which refuses one without a .shp by its own code (derived)", async () => {
    const zip = file("notes.zip", await zipOf({ "readme.txt": "no shapes here" }));
    const err = await refusal(inspectUpload(zip, { declaredKind: "zip" }));
    expect(err).toBeInstanceOf(InspectionFailedError);
    expect(err.code).toBe("no_shapefile");
  });

  it("JSON that is not GeoJSON lines is refused with the vector reader's code (RFC 7946 §3.3)", async () => {
    const err = await refusal(inspectUpload(file("points.json", JSON.stringify({ type: "FeatureCollection", features: [
      { type: "Feature", properties: {}, geometry: { type: "Point", coordinates: [0, 0] } },
    ] }))));
    expect(err).toBeInstanceOf(InspectionFailedError);
    expect(err.code).toBe("not_lines");
  });

  it("a declared 10⁶ × 10⁶ raster is refused from its header, before any allocation (DESIGN.md: size checked first)", async () => {
    const err = await refusal(inspectUpload(file("huge.tif", absurdSizeTiff())));
    expect(err).toBeInstanceOf(InspectionFailedError);
    expect(err.code).toBe("too-large");
  });

  it("GeoJSON nested 200 000 levels deep is refused without recursing (regression: JSON.parse stack depth)", async () => {
    const deep = `{"type":"FeatureCollection","features":${"[".repeat(200_000)}${"]".repeat(200_000)}}`;
    const err = await refusal(inspectUpload(file("deep.geojson", deep)));
    expect(err).toBeInstanceOf(InspectionFailedError);
    expect(err.code).toBe("too_deep");
  });

  it("a zip bomb (300 MiB of zeros in a few hundred KiB) is stopped while inflating, within seconds (derived)", async () => {
    const zeros = Readable.from((function* () {
      const mib = Buffer.alloc(1024 * 1024);
      for (let i = 0; i < 300; i++) yield mib;
    })());
    const bomb = file("bomb.zip", await zipOf({ "lines.shp": zeros }));
    const started = performance.now();
    const err = await refusal(inspectUpload(bomb, { declaredKind: "zip" }));
    expect(err).toBeInstanceOf(InspectionFailedError);
    expect(err.code).toBe("zip_too_large");
    expect(performance.now() - started).toBeLessThan(10_000);
  });
});
