// GeoTIFF 1.1 (OGC 19-008r4) elevation reader: the layout check of tiff-structure.ts, then one block at a
// time through block-decoder.ts (bounded decompression, geotiff.js's decoders inline, no worker pool).
import { open } from "node:fs/promises";
import { makeGrid, type Grid } from "@/lib/raster/grid";
import { geographicCellGeometry, projectedCellGeometry, type CellGeometry } from "@/lib/raster/cell-geometry";
import { RasterError } from "@/lib/raster/errors";
import { checkTiffLayout, TAG, type TiffLayout } from "@/lib/raster/tiff-structure";
import { crsFromGeoKeys, GEOKEY, parseGeoKeys, verticalUnitToMetre, type CrsInfo } from "@/lib/raster/crs";
import { lonLatTransformer } from "@/lib/raster/reproject";
import { makeBlockDecoder } from "@/lib/raster/block-decoder";

export type { CrsInfo } from "@/lib/raster/crs";

/** Largest grid read unless the caller says otherwise: 400 M cells = 1.6 GB of Float32 elevations. */
export const DEFAULT_CELL_BUDGET = 400_000_000;

export interface Georeference {
  crs: CrsInfo;
  /** CRS units; origin = outer corner of the top-left cell; pixelSizeY > 0 and rows go south */
  transform: { originX: number; originY: number; pixelSizeX: number; pixelSizeY: number };
  /** as the file declares it; the origin above is already the cell corner in both cases */
  rasterType: "PixelIsArea" | "PixelIsPoint";
}

export interface RasterInfo {
  width: number;
  height: number;
  bands: number;
  /** of the band read: Int8 … Float64 */
  dataType: string;
  compression: string;
  predictor: number;
  tiled: boolean;
  /** block size: tile size, or width × rows per strip */
  tileWidth: number;
  tileHeight: number;
  /** the GDAL_NODATA value, NaN when it is "nan", null when the tag is absent */
  nodata: number | null;
  /** lon/lat (WGS 84) bounding box [west, south, east, north] */
  bboxLonLat: [number, number, number, number];
  /** cell width and height in metres (at the centre row for geographic grids) */
  cellSizeM: [number, number];
}

export interface Dem {
  /** NaN = nodata; metres (vertical unit converted, then × zFactor) */
  elevation: Grid<Float32Array>;
  georef: Georeference;
  cellGeometry: CellGeometry;
  info: RasterInfo;
}

export interface ReadDemOptions {
  /** 1-based band; required when the file has several */
  band?: number;
  /** most cells accepted (width × height), checked before anything is allocated */
  cellBudget?: number;
  /** EPSG code of the grid's CRS: supplies a missing CRS or overrides the file's */
  epsg?: number;
  /** factor applied to the elevations after the vertical-unit conversion */
  zFactor?: number;
  signal?: AbortSignal;
}

/** The `compression` of a raster whose blocks are stored as they are (TIFF 6.0 Compression = 1). */
export const UNCOMPRESSED = "None";
const COMPRESSION: Record<number, string> = {
  1: UNCOMPRESSED, 5: "LZW", 8: "Deflate", 32946: "Deflate", 32773: "PackBits", 34887: "LERC", 50000: "Zstd",
};
const UNSUPPORTED_COMPRESSION: Record<number, string> = {
  2: "CCITT RLE", 3: "CCITT Group 3 fax", 4: "CCITT Group 4 fax", 6: "old-style JPEG",
  7: "JPEG (lossy; not accepted for elevations)", 34712: "JPEG 2000", 34925: "LZMA", 50001: "WebP",
};
const DATA_TYPE: Record<number, Record<number, string>> = {
  1: { 8: "UInt8", 16: "UInt16", 32: "UInt32" },
  2: { 8: "Int8", 16: "Int16", 32: "Int32" },
  3: { 32: "Float32", 64: "Float64" },
};

interface Described {
  layout: TiffLayout;
  info: RasterInfo;
  georef: Georeference;
  bandIndex: number;
  verticalToMetre: number;
  cellGeometry: () => CellGeometry;
}

function describe(layout: TiffLayout, options: ReadDemOptions): Described {
  const { samplesPerPixel: bands } = layout;
  if (options.band === undefined && bands > 1) {
    throw new RasterError("band-required", `the file has ${bands} bands; choose one with the \`band\` option (1–${bands})`);
  }
  const band = options.band ?? 1;
  if (!Number.isInteger(band) || band < 1 || band > bands) throw new RasterError("band-required", `band ${band} does not exist; the file has ${bands} band(s)`);
  const bandIndex = band - 1;

  const compression = COMPRESSION[layout.compression];
  if (compression === undefined) {
    throw new RasterError("unsupported", `compression ${UNSUPPORTED_COMPRESSION[layout.compression] ?? `code ${layout.compression}`}`);
  }
  const format = layout.sampleFormat[bandIndex];
  const bits = layout.bitsPerSample[bandIndex];
  const dataType = DATA_TYPE[format]?.[bits];
  if (dataType === undefined) {
    const what = format === 5 || format === 6 ? "complex samples"
      : (format === 1 || format === 2) && bits === 64 ? "64-bit integers"
      : `${bits}-bit ${format === 3 ? "floating-point" : format === 2 ? "signed" : format === 1 ? "unsigned" : `format-${format}`} samples`;
    throw new RasterError("unsupported", `${what} (Int8/16/32, UInt8/16/32, Float32/64 are read)`);
  }
  const mixed = layout.bitsPerSample.some((b, i) => b !== bits || layout.sampleFormat[i] !== format);
  if (mixed) throw new RasterError("unsupported", "bands of different sample types");
  if (layout.planarConfiguration !== 1 && layout.planarConfiguration !== 2) {
    throw new RasterError("unsupported", `planar configuration ${layout.planarConfiguration}`);
  }
  if (![1, 2, 3].includes(layout.predictor)) throw new RasterError("unsupported", `predictor ${layout.predictor}`);
  if (layout.predictor === 3 && format !== 3) throw new RasterError("unsupported", `floating-point predictor on ${dataType} samples`);
  if (layout.predictor === 2 && bits === 64) throw new RasterError("unsupported", `horizontal-differencing predictor on ${dataType} samples (geotiff.js undoes it for 8–32 bits only)`);

  const numbers = (tag: number): number[] | undefined => {
    const v = layout.tags.get(tag);
    return Array.isArray(v) ? v : undefined;
  };
  const geoDirectory = numbers(TAG.GeoKeyDirectory);
  const ascii = layout.tags.get(TAG.GeoAsciiParams);
  const keys = geoDirectory ? parseGeoKeys(geoDirectory, numbers(TAG.GeoDoubleParams), typeof ascii === "string" ? ascii : "") : null;
  const crs = crsFromGeoKeys(keys, options.epsg);
  // Cell sizes of a projected grid are taken in CRS units; on Mercator grids those grow as sec φ
  // (a 30 m Web Mercator cell at 60° covers 15 m of ground), so such grids are refused, not mis-measured.
  if (!crs.geographic && /\+proj=merc\b/.test(crs.proj4)) {
    throw new RasterError("unsupported", `${crs.name} is a Mercator projection, whose cells are not their size on the ground; reproject the DEM to a UTM zone or to EPSG:4326`);
  }
  const rasterType = keys?.get(GEOKEY.GTRasterType) === 2 ? "PixelIsPoint" : "PixelIsArea";
  const transform = modelTransform(numbers(TAG.ModelPixelScale), numbers(TAG.ModelTiepoint), numbers(TAG.ModelTransformation), rasterType);
  const georef: Georeference = { crs, transform, rasterType };

  const nodataText = layout.tags.get(TAG.GdalNodata);
  let nodata: number | null = null;
  if (typeof nodataText === "string" && nodataText.trim() !== "") {
    nodata = /^\s*[+-]?nan\s*$/i.test(nodataText) ? NaN : Number(nodataText);
    if (Number.isNaN(nodata) && !/nan/i.test(nodataText)) throw new RasterError("corrupt", `GDAL_NODATA "${nodataText}" is not a number`);
  }

  const { width, height } = layout;
  const cellGeometry = (): CellGeometry => crs.geographic
    ? geographicCellGeometry(height, transform.originY, transform.pixelSizeX, transform.pixelSizeY)
    : projectedCellGeometry(height, transform.pixelSizeX * crs.linearUnitToMetre, transform.pixelSizeY * crs.linearUnitToMetre);
  let cellSizeM: [number, number];
  if (crs.geographic) {
    const centre = geographicCellGeometry(1, transform.originY - (height / 2 - 0.5) * transform.pixelSizeY, transform.pixelSizeX, transform.pixelSizeY);
    cellSizeM = [centre.dx[0], centre.dy[0]];
  } else {
    cellSizeM = [transform.pixelSizeX * crs.linearUnitToMetre, transform.pixelSizeY * crs.linearUnitToMetre];
  }
  const info: RasterInfo = {
    width, height, bands, dataType, compression, predictor: layout.predictor, tiled: layout.tiled,
    tileWidth: layout.blockWidth, tileHeight: layout.blockHeight, nodata,
    bboxLonLat: lonLatBox(crs, transform, width, height), cellSizeM,
  };
  return { layout, info, georef, bandIndex, verticalToMetre: verticalUnitToMetre(keys), cellGeometry };
}

/** Tiepoint + pixel scale, or the model transformation (GeoTIFF 1.1 §7.2), as an outer-corner origin. */
function modelTransform(scale: number[] | undefined, tiepoint: number[] | undefined, matrix: number[] | undefined,
  rasterType: Georeference["rasterType"]): Georeference["transform"] {
  let originX: number, originY: number, pixelSizeX: number, pixelSizeY: number, i0 = 0, j0 = 0;
  if (matrix && matrix.length >= 16) {
    const [a, b, , d, e, f, , h] = matrix;
    if (b !== 0 || e !== 0) throw new RasterError("rotated", `the model transformation rotates or shears the grid (terms ${b}, ${e}); reproject it to a north-up grid first`);
    [pixelSizeX, pixelSizeY, originX, originY] = [a, -f, d, h];
  } else if (scale && scale.length >= 2 && tiepoint && tiepoint.length >= 6) {
    if (tiepoint.length > 6) throw new RasterError("unsupported", `${tiepoint.length / 6} tiepoints without a single transformation (a warped grid)`);
    [pixelSizeX, pixelSizeY] = scale;
    [i0, j0] = tiepoint;
    originX = tiepoint[3] - i0 * pixelSizeX;
    originY = tiepoint[4] + j0 * pixelSizeY;
  } else {
    throw new RasterError("georef-missing", "the file has neither a tiepoint with a pixel scale nor a model transformation");
  }
  if (!(pixelSizeX > 0) || !(pixelSizeY > 0) || !Number.isFinite(originX) || !Number.isFinite(originY)) {
    throw new RasterError("unsupported", `cell size ${pixelSizeX} × ${-pixelSizeY} (only north-up grids with rows going south are read)`);
  }
  // PixelIsPoint: the raster coordinates name cell centres (GeoTIFF 1.1 §7.1), so the corner is half a cell out
  if (rasterType === "PixelIsPoint") {
    originX -= pixelSizeX / 2;
    originY += pixelSizeY / 2;
  }
  return { originX, originY, pixelSizeX, pixelSizeY };
}

/** Lon/lat box of the grid, from points along its four edges (a projected box is curved in lon/lat). */
function lonLatBox(crs: CrsInfo, t: Georeference["transform"], width: number, height: number): [number, number, number, number] {
  const toLonLat = lonLatTransformer(crs);
  const steps = crs.geographic ? 1 : 16;
  let w = Infinity, s = Infinity, e = -Infinity, n = -Infinity;
  for (let k = 0; k <= steps; k++) {
    const f = k / steps;
    for (const [u, v] of [[f, 0], [f, 1], [0, f], [1, f]]) {
      const [lon, lat] = toLonLat(t.originX + u * width * t.pixelSizeX, t.originY - v * height * t.pixelSizeY);
      w = Math.min(w, lon); e = Math.max(e, lon); s = Math.min(s, lat); n = Math.max(n, lat);
    }
  }
  return [w, s, e, n];
}

function checkOptions(options: ReadDemOptions): number {
  const budget = options.cellBudget ?? DEFAULT_CELL_BUDGET;
  if (!(budget > 0)) throw new RangeError(`cellBudget must be positive, got ${budget}`);
  // a negative factor would turn the terrain upside down (ridges become valleys): refused, not "supported"
  if (options.zFactor !== undefined && !(Number.isFinite(options.zFactor) && options.zFactor > 0)) {
    throw new RangeError(`zFactor must be a finite positive number, got ${options.zFactor}`);
  }
  return budget;
}

/** Metadata of a GeoTIFF without decoding or allocating any pixels. */
export async function inspectGeoTiff(path: string, options: ReadDemOptions = {}): Promise<RasterInfo & { georef: Georeference }> {
  const { info, georef } = describe(await checkTiffLayout(path, checkOptions(options)), options);
  return { ...info, georef };
}

const SAMPLE_ARRAY = {
  UInt8: Uint8Array, UInt16: Uint16Array, UInt32: Uint32Array, Int8: Int8Array, Int16: Int16Array, Int32: Int32Array,
  Float32: Float32Array, Float64: Float64Array,
} as const;

/** Reads one band of a GeoTIFF DEM into Float32 metres (NaN = nodata) with its georeferencing and cell geometry.
 *  Blocks are read one at a time at the offsets the layout check validated, so memory is the output grid plus
 *  one block. geotiff.js's window read is not used: its decoders cannot be bounded from outside, and its LZW
 *  decoder grows a plain array per block (a 4096² LZW file: 35 s there, 4.7 s here; uncompressed, 0.83 s
 *  against 0.47 s including the Float32 conversion; both on the shared, loaded test machine). */
export async function readDem(path: string, options: ReadDemOptions = {}): Promise<Dem> {
  const budget = checkOptions(options);
  const layout = await checkTiffLayout(path, budget);
  const d = describe(layout, options);
  const { width, height } = d.info;
  const scale = d.verticalToMetre * (options.zFactor ?? 1);
  const floatNodata = d.info.dataType === "Float32" && d.info.nodata !== null ? Math.fround(d.info.nodata) : d.info.nodata;
  // NaN needs no comparison: NaN · scale stays NaN
  const nodata = floatNodata === null || Number.isNaN(floatNodata) ? undefined : floatNodata;
  const Samples = SAMPLE_ARRAY[d.info.dataType as keyof typeof SAMPLE_ARRAY];
  const sampleBytes = Samples.BYTES_PER_ELEMENT;
  const { blockWidth, blockHeight, planarConfiguration, samplesPerPixel } = layout;
  const across = Math.ceil(width / blockWidth);
  const down = Math.ceil(height / blockHeight);
  const plane = planarConfiguration === 2 ? d.bandIndex * across * down : 0;
  const stride = planarConfiguration === 1 ? samplesPerPixel : 1;
  const sampleOffset = planarConfiguration === 1 ? d.bandIndex : 0;
  const sparseValue = nodata === undefined && d.info.nodata === null ? 0 : NaN;

  const decoder = await makeBlockDecoder(layout);
  let out: Float32Array;
  try {
    out = new Float32Array(width * height);
  } catch {
    throw new RasterError("too-large", `cannot allocate ${width} × ${height} Float32 cells on this machine`);
  }
  const fh = await open(path, "r");
  try {
    for (let by = 0; by < down; by++) {
      if (options.signal?.aborted) throw new RasterError("aborted", "reading was cancelled");
      const y0 = by * blockHeight;
      const rows = Math.min(blockHeight, height - y0);
      for (let bx = 0; bx < across; bx++) {
        const x0 = bx * blockWidth;
        const cols = Math.min(blockWidth, width - x0);
        const index = plane + by * across + bx;
        const count = layout.blockByteCounts[index];
        if (count === 0) {
          // a sparse block: GDAL's reading is nodata, or 0 without a nodata value
          for (let r = 0; r < rows; r++) out.fill(sparseValue, (y0 + r) * width + x0, (y0 + r) * width + x0 + cols);
          continue;
        }
        const stored = new Uint8Array(count);
        await fh.read(stored, 0, count, layout.blockOffsets[index]);
        const decoded = await decoder.decode(stored, layout.tiled ? blockHeight : rows);
        const samples = new Samples(decoded, 0, Math.floor(decoded.byteLength / sampleBytes));
        const rowStride = blockWidth * stride;
        const rowsHere = Math.min(rows, Math.floor(samples.length / rowStride));
        if (rowsHere < rows) throw new RasterError("corrupt", `block ${index} holds ${rowsHere} of its ${rows} rows`);
        for (let r = 0; r < rows; r++) {
          let src = r * rowStride + sampleOffset;
          const dst = (y0 + r) * width + x0;
          for (let c = 0; c < cols; c++, src += stride) {
            const v = samples[src];
            out[dst + c] = v === nodata ? NaN : v * scale;
          }
        }
      }
    }
  } finally {
    await fh.close();
  }
  return { elevation: makeGrid(out, width, height), georef: d.georef, cellGeometry: d.cellGeometry(), info: d.info };
}
