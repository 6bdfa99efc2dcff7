// One TIFF block from stored bytes to samples: decompression bounded by the block's size (TIFF 6.0 §13 LZW,
// §9 PackBits, RFC 1950 Deflate via node:zlib, RFC 8878 Zstd and LERC through geotiff.js), then the
// predictor undone by geotiff.js (TIFF 6.0 §14; Adobe TIFF Technical Note 3 for floating point).
import { inflateSync } from "node:zlib";
import { getDecoder } from "geotiff";
import { RasterError } from "@/lib/raster/errors";
import { TAG, type TiffLayout } from "@/lib/raster/tiff-structure";
import { decodeTiffLzw } from "@/lib/raster/tiff-lzw";
import { decodePackBits } from "@/lib/raster/packbits";
import { withContentSize, zstdOutputBound } from "@/lib/raster/zstd-frame";

/** A LERC blob may exceed its raw block (mask, raw fallback); same allowance as the layout check. */
const LERC_BLOB_FACTOR = 2;
const LERC_BLOB_SLACK = 65536;
/** Allowance over the block size for a Zstd stream's output bound, which counts each compressed
 *  block at the format's maximum; a legitimate block stays well inside, a bomb does not. */
const ZSTD_BOUND_FACTOR = 4;
const ZSTD_BOUND_SLACK = 128 * 1024;
/** LercParameters' AddCompression values (GDAL's LERC_DEFLATE and LERC_ZSTD). */
const LERC_ADD_NONE = 0, LERC_ADD_DEFLATE = 1, LERC_ADD_ZSTD = 2;

export interface BlockDecoder {
  /** the block's samples in the host's (little-endian) byte order, predictor undone; `rows` is the
   *  number of image rows the block holds (a last strip may hold fewer than the others) */
  decode(stored: Uint8Array, rows: number): Promise<ArrayBuffer>;
}

/** Reverses the byte order of each `size`-byte sample in place. */
function swapBytes(bytes: Uint8Array, size: number): void {
  for (let i = 0; i + size <= bytes.length; i += size) {
    for (let a = i, b = i + size - 1; a < b; a++, b--) {
      const t = bytes[a];
      bytes[a] = bytes[b];
      bytes[b] = t;
    }
  }
}

interface GeotiffDecoder { decode(buffer: ArrayBufferLike): Promise<ArrayBufferLike> }

function corrupt(what: string): RasterError {
  return new RasterError("corrupt", what);
}

function inflateBounded(input: Uint8Array, maxBytes: number, what: string): Uint8Array {
  try {
    return inflateSync(input, { maxOutputLength: maxBytes });
  } catch (err) {
    if ((err as { code?: string }).code === "ERR_BUFFER_TOO_LARGE") throw corrupt(`a ${what} block expands past its declared ${maxBytes} bytes`);
    throw corrupt(`a ${what} block does not inflate: ${(err as Error).message}`);
  }
}

function ownBuffer(bytes: Uint8Array, length = bytes.length): ArrayBuffer {
  return bytes.byteOffset === 0 && length === bytes.buffer.byteLength
    ? (bytes.buffer as ArrayBuffer)
    : (bytes.buffer.slice(bytes.byteOffset, bytes.byteOffset + length) as ArrayBuffer);
}

/** LERC2 header (Esri LERC, lerc2 format): rows and columns must fit the block before decoding allocates them. */
function checkLercHeader(blob: Uint8Array, blockWidth: number, blockHeight: number): void {
  const magic = "Lerc2 ";
  for (let i = 0; i < magic.length; i++) if (blob[i] !== magic.charCodeAt(i)) return; // Lerc1 blobs: sizes checked after decoding
  const view = new DataView(blob.buffer, blob.byteOffset, blob.byteLength);
  if (blob.length < 22) throw corrupt("a LERC blob is cut short");
  const version = view.getInt32(6, true);
  const at = version >= 3 ? 14 : 10;
  const rows = view.getInt32(at, true);
  const cols = view.getInt32(at + 4, true);
  if (rows <= 0 || rows > blockHeight || cols <= 0 || cols > blockWidth) {
    throw corrupt(`a LERC blob declares ${cols} × ${rows} cells for a ${blockWidth} × ${blockHeight} block`);
  }
}

export async function makeBlockDecoder(layout: TiffLayout): Promise<BlockDecoder> {
  const { compression, blockWidth, blockHeight, planarConfiguration, predictor, bitsPerSample } = layout;
  const bytesPerPixel = planarConfiguration === 2 ? bitsPerSample[0] / 8 : bitsPerSample.reduce((a, b) => a + b, 0) / 8;
  const rowBytes = blockWidth * bytesPerPixel;
  const maxBytes = rowBytes * blockHeight;
  const parameters = { tileWidth: blockWidth, tileHeight: blockHeight, planarConfiguration, bitsPerSample, predictor: 1 };
  const swapSize = layout.littleEndian || compression === 34887 ? 0 : bitsPerSample[0] / 8;
  const withPredictor = predictor === 1 ? null : ((await getDecoder(1, { ...parameters, predictor } as never)) as unknown as GeotiffDecoder);

  let decompress: (stored: Uint8Array, rows: number) => Promise<ArrayBuffer>;
  switch (compression) {
    case 1:
      decompress = async (stored) => ownBuffer(stored, Math.min(stored.length, maxBytes));
      break;
    case 5:
      decompress = async (stored) => {
        const out = new Uint8Array(maxBytes);
        return ownBuffer(out, decodeTiffLzw(stored, out));
      };
      break;
    case 8:
    case 32946:
      decompress = async (stored) => ownBuffer(inflateBounded(stored, maxBytes, "Deflate"));
      break;
    case 32773:
      decompress = async (stored) => {
        const out = new Uint8Array(maxBytes);
        return ownBuffer(out, decodePackBits(stored, out));
      };
      break;
    case 50000: {
      const zstd = (await getDecoder(50000, parameters as never)) as unknown as GeotiffDecoder;
      decompress = async (stored, rows) => {
        if (zstdOutputBound(stored) > maxBytes * ZSTD_BOUND_FACTOR + ZSTD_BOUND_SLACK) throw corrupt(`a Zstd block can expand past its declared ${maxBytes} bytes`);
        return (await zstd.decode(ownBuffer(withContentSize(stored, rowBytes * rows)))) as ArrayBuffer;
      };
      break;
    }
    case 34887: {
      const lercParameters = layout.tags.get(TAG.LercParameters);
      const add = Array.isArray(lercParameters) ? lercParameters[1] ?? LERC_ADD_NONE : LERC_ADD_NONE;
      if (add !== LERC_ADD_NONE && add !== LERC_ADD_DEFLATE && add !== LERC_ADD_ZSTD) {
        throw new RasterError("unsupported", `LERC with additional compression ${add}`);
      }
      // the additional compression is undone here, bounded; geotiff.js only decodes the LERC blob
      const lerc = (await getDecoder(34887, { ...parameters, LercParameters: [lercParameters?.[0] ?? 2, LERC_ADD_NONE] } as never)) as unknown as GeotiffDecoder;
      const zstd = add === LERC_ADD_ZSTD ? ((await getDecoder(50000, parameters as never)) as unknown as GeotiffDecoder) : null;
      const maxBlob = maxBytes * LERC_BLOB_FACTOR + LERC_BLOB_SLACK;
      decompress = async (stored) => {
        let blob = stored;
        if (add === LERC_ADD_DEFLATE) blob = inflateBounded(stored, maxBlob, "LERC-Deflate");
        if (zstd) {
          if (zstdOutputBound(stored) > maxBlob * ZSTD_BOUND_FACTOR + ZSTD_BOUND_SLACK) throw corrupt(`a LERC-Zstd block can expand past ${maxBlob} bytes`);
          blob = new Uint8Array(await zstd.decode(ownBuffer(withContentSize(stored, null))));
        }
        checkLercHeader(blob, blockWidth, blockHeight);
        return (await lerc.decode(ownBuffer(blob))) as ArrayBuffer;
      };
      break;
    }
    default:
      throw new RasterError("unsupported", `compression code ${compression}`);
  }

  return {
    async decode(stored, rows) {
      let raw: ArrayBuffer;
      try {
        raw = await decompress(stored, rows);
      } catch (err) {
        throw err instanceof RasterError ? err : corrupt(`a block does not decode: ${(err as Error).message}`);
      }
      // at least the block's rows (a writer may pad a last strip to full size), never more than a full block
      const expected = rowBytes * rows;
      if (raw.byteLength < expected || raw.byteLength > maxBytes) {
        throw corrupt(`a block decodes to ${raw.byteLength} bytes, expected ${expected === maxBytes ? maxBytes : `${expected}–${maxBytes}`}`);
      }
      // Big-endian files: horizontal differencing works on sample values, so swap before undoing it;
      // the floating-point predictor's byte planes come out in file order (libtiff writes them so),
      // so swap after. LERC decodes to host order itself.
      if (swapSize > 1 && predictor === 2) swapBytes(new Uint8Array(raw), swapSize);
      const samples = withPredictor ? ((await withPredictor.decode(raw.byteLength === expected ? raw : raw.slice(0, expected))) as ArrayBuffer) : raw;
      if (swapSize > 1 && predictor !== 2) swapBytes(new Uint8Array(samples), swapSize);
      return samples;
    },
  };
}
