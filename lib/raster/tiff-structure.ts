// TIFF 6.0 (Adobe 1992) and BigTIFF (Aware Systems 2008) layout check, done before any decoder sees the file.
// geotiff.js trusts the file: a loop in the IFD chain makes it spin, offsets past the end read zeros,
// and a declared size is allocated as asked. This walk reads only directory bytes, bounds every
// offset by the file size, and stops at the first broken rule with a RasterError.
import { open, type FileHandle } from "node:fs/promises";
import { RasterError } from "@/lib/raster/errors";

/** Most directories a legitimate file carries (full image, overviews, masks); more means a forged chain. */
const MAX_DIRECTORIES = 1024;
/** Most entries in one directory; TIFF files in the wild carry a few dozen. */
const MAX_ENTRIES = 4096;
/** Slack allowed above a block's worst-case compressed size (codec headers, LERC masks). */
const BLOCK_BYTES_SLACK = 65536;
/** Worst-case compressed/raw size ratio per compression code: PackBits adds one byte per 128,
 *  LZW at most 12 bits per byte, Deflate and Zstd store incompressible data nearly raw; LERC may
 *  keep a raw copy plus its mask. Bounding the input also bounds what a decoder can be fed. */
const WORST_CASE_RATIO: Record<number, number> = { 1: 1, 5: 1.5, 8: 1.01, 32946: 1.01, 32773: 1.01, 50000: 1.01, 34887: 2 };

export const TAG = {
  ImageWidth: 256,
  ImageLength: 257,
  BitsPerSample: 258,
  Compression: 259,
  StripOffsets: 273,
  SamplesPerPixel: 277,
  RowsPerStrip: 278,
  StripByteCounts: 279,
  PlanarConfiguration: 284,
  Predictor: 317,
  TileWidth: 322,
  TileLength: 323,
  TileOffsets: 324,
  TileByteCounts: 325,
  SampleFormat: 339,
  ModelPixelScale: 33550,
  ModelTiepoint: 33922,
  ModelTransformation: 34264,
  GeoKeyDirectory: 34735,
  GeoDoubleParams: 34736,
  GeoAsciiParams: 34737,
  GdalNodata: 42113,
  LercParameters: 50674,
} as const;

/** The tags whose values the reader uses; every other tag is only bounds-checked. */
const KEPT_TAGS = new Set<number>(Object.values(TAG));
const BLOCK_TABLES = new Set<number>([TAG.StripOffsets, TAG.StripByteCounts, TAG.TileOffsets, TAG.TileByteCounts]);

/** Byte size of each TIFF field type (TIFF 6.0 §2, BigTIFF adds 16–18). */
const TYPE_SIZE: Record<number, number> = {
  1: 1, 2: 1, 3: 2, 4: 4, 5: 8, 6: 1, 7: 1, 8: 2, 9: 4, 10: 8, 11: 4, 12: 8, 13: 4, 16: 8, 17: 8, 18: 8,
};

export interface TiffLayout {
  fileSize: number;
  bigTiff: boolean;
  littleEndian: boolean;
  /** directories in the chain (the first is the image we read) */
  directoryCount: number;
  width: number;
  height: number;
  samplesPerPixel: number;
  bitsPerSample: number[];
  /** 1 unsigned, 2 signed, 3 float, 5/6 complex (TIFF 6.0 §19) */
  sampleFormat: number[];
  compression: number;
  predictor: number;
  planarConfiguration: number;
  tiled: boolean;
  blockWidth: number;
  blockHeight: number;
  blockCount: number;
  /** file offset and byte count of every block, in TIFF order (row by row, plane by plane) */
  blockOffsets: number[];
  blockByteCounts: number[];
  /** kept tag values of the first directory: numbers, or the text of an ASCII tag */
  tags: Map<number, number[] | string>;
}

interface Entry { tag: number; type: number; count: number; valueAt: number }

class Reader {
  constructor(private readonly fh: FileHandle, readonly size: number, readonly little: boolean) {}

  async bytes(offset: number, length: number, what: string): Promise<Buffer> {
    if (!Number.isSafeInteger(offset) || offset < 0 || length < 0 || offset + length > this.size) {
      throw new RasterError("corrupt", `${what} at byte ${offset} (+${length}) lies past the end of the ${this.size}-byte file`);
    }
    const buf = Buffer.alloc(length);
    const { bytesRead } = await this.fh.read(buf, 0, length, offset);
    if (bytesRead !== length) throw new RasterError("corrupt", `${what}: short read at byte ${offset}`);
    return buf;
  }

  uint(buf: Buffer, at: number, size: number): number {
    switch (size) {
      case 1: return buf.readUInt8(at);
      case 2: return this.little ? buf.readUInt16LE(at) : buf.readUInt16BE(at);
      case 4: return this.little ? buf.readUInt32LE(at) : buf.readUInt32BE(at);
      default: {
        const v = this.little ? buf.readBigUInt64LE(at) : buf.readBigUInt64BE(at);
        // offsets beyond 2^53 cannot lie inside any file we read
        return v > BigInt(Number.MAX_SAFE_INTEGER) ? Number.MAX_SAFE_INTEGER : Number(v);
      }
    }
  }

  value(buf: Buffer, at: number, type: number): number {
    const le = this.little;
    switch (type) {
      case 6: return buf.readInt8(at);
      case 8: return le ? buf.readInt16LE(at) : buf.readInt16BE(at);
      case 9: return le ? buf.readInt32LE(at) : buf.readInt32BE(at);
      case 11: return le ? buf.readFloatLE(at) : buf.readFloatBE(at);
      case 12: return le ? buf.readDoubleLE(at) : buf.readDoubleBE(at);
      case 5: return this.uint(buf, at, 4) / this.uint(buf, at + 4, 4);
      case 10: return (le ? buf.readInt32LE(at) : buf.readInt32BE(at)) / (le ? buf.readInt32LE(at + 4) : buf.readInt32BE(at + 4));
      case 17: return Number(le ? buf.readBigInt64LE(at) : buf.readBigInt64BE(at));
      default: return this.uint(buf, at, TYPE_SIZE[type]);
    }
  }
}

/** Walks the header and every directory of a TIFF and checks the first image's block table. */
export async function checkTiffLayout(path: string, cellBudget: number): Promise<TiffLayout> {
  const fh = await open(path, "r");
  try {
    const { size } = await fh.stat();
    return await walk(fh, size, cellBudget);
  } finally {
    await fh.close();
  }
}

async function walk(fh: FileHandle, size: number, cellBudget: number): Promise<TiffLayout> {
  if (size < 8) throw new RasterError("not-tiff", `the file has only ${size} bytes`);
  const head = Buffer.alloc(16);
  await fh.read(head, 0, Math.min(16, size), 0);
  const order = head.toString("latin1", 0, 2);
  if (order !== "II" && order !== "MM") {
    const png = head.subarray(0, 8).equals(Buffer.from([0x89, 0x50, 0x4e, 0x47, 0x0d, 0x0a, 0x1a, 0x0a]));
    throw new RasterError("not-tiff", png ? "the file is a PNG image, not a TIFF" : "the file does not start with a TIFF byte-order mark");
  }
  const r = new Reader(fh, size, order === "II");
  const magic = r.uint(head, 2, 2);
  if (magic !== 42 && magic !== 43) throw new RasterError("not-tiff", `TIFF version ${magic} (expected 42, or 43 for BigTIFF)`);
  const big = magic === 43;
  if (big && (size < 16 || r.uint(head, 4, 2) !== 8)) throw new RasterError("corrupt", "BigTIFF header with an offset size other than 8");
  const offSize = big ? 8 : 4;
  const countSize = big ? 8 : 2;
  const entrySize = big ? 20 : 12;

  let next = r.uint(head, big ? 8 : 4, offSize);
  const seen = new Set<number>();
  let first: Entry[] | null = null;
  while (next !== 0) {
    if (seen.has(next)) throw new RasterError("corrupt", `the chain of image directories loops back to byte ${next}`);
    if (seen.size >= MAX_DIRECTORIES) throw new RasterError("corrupt", `more than ${MAX_DIRECTORIES} image directories`);
    seen.add(next);
    const n = r.uint(await r.bytes(next, countSize, "image directory"), 0, countSize);
    if (n === 0 || n > MAX_ENTRIES) throw new RasterError("corrupt", `an image directory claims ${n} entries`);
    const body = await r.bytes(next + countSize, n * entrySize + offSize, "image directory entries");
    const entries: Entry[] = [];
    for (let i = 0; i < n; i++) {
      const at = i * entrySize;
      const tag = r.uint(body, at, 2);
      const type = r.uint(body, at + 2, 2);
      const count = r.uint(body, at + 4, big ? 8 : 4);
      const typeSize = TYPE_SIZE[type];
      if (typeSize === undefined) continue; // unknown field types are skipped (TIFF 6.0 §2)
      const length = count * typeSize;
      const inline = length <= offSize;
      const valueAt = inline ? next + countSize + at + (big ? 12 : 8) : r.uint(body, at + (big ? 12 : 8), offSize);
      if (!inline && (!Number.isSafeInteger(length) || valueAt + length > size)) {
        throw new RasterError("corrupt", `tag ${tag} claims ${count} values at byte ${valueAt}, past the end of the ${size}-byte file`);
      }
      entries.push({ tag, type, count, valueAt });
    }
    first ??= entries;
    next = r.uint(body, n * entrySize, offSize);
  }
  if (!first) throw new RasterError("corrupt", "the file has no image directory");

  const tags = new Map<number, number[] | string>();
  const byTag = new Map(first.map((e) => [e.tag, e]));
  const readTag = async (e: Entry): Promise<number[] | string> => {
    const buf = await r.bytes(e.valueAt, e.count * TYPE_SIZE[e.type], `tag ${e.tag}`);
    if (e.type === 2) return buf.toString("latin1").replace(/\0+$/, "");
    const out = new Array<number>(e.count);
    for (let i = 0; i < e.count; i++) out[i] = r.value(buf, i * TYPE_SIZE[e.type], e.type);
    return out;
  };
  const num = async (tag: number, fallback?: number): Promise<number> => {
    const e = byTag.get(tag);
    if (!e) {
      if (fallback === undefined) throw new RasterError("corrupt", `the image directory lacks tag ${tag}`);
      return fallback;
    }
    const v = await readTag(e);
    if (typeof v === "string" || v.length === 0) throw new RasterError("corrupt", `tag ${tag} holds no number`);
    return v[0];
  };

  const width = await num(TAG.ImageWidth);
  const height = await num(TAG.ImageLength);
  if (!(width > 0 && height > 0)) throw new RasterError("corrupt", `declared size ${width} × ${height}`);
  if (width * height > cellBudget) {
    throw new RasterError("too-large", `declared ${width} × ${height} = ${width * height} cells, over the budget of ${cellBudget} cells`);
  }
  // small tags first; the block tables after the size check
  for (const e of first) {
    if (KEPT_TAGS.has(e.tag) && !BLOCK_TABLES.has(e.tag) && e.count <= MAX_ENTRIES) tags.set(e.tag, await readTag(e));
  }
  const samplesPerPixel = await num(TAG.SamplesPerPixel, 1);
  const listOf = (tag: number, fallback: number): number[] => {
    const v = tags.get(tag);
    const arr = Array.isArray(v) && v.length > 0 ? v : [fallback];
    return Array.from({ length: samplesPerPixel }, (_, i) => arr[Math.min(i, arr.length - 1)]);
  };
  const bitsPerSample = listOf(TAG.BitsPerSample, 1);
  const sampleFormat = listOf(TAG.SampleFormat, 1);
  const planarConfiguration = await num(TAG.PlanarConfiguration, 1);
  const tiled = byTag.has(TAG.TileOffsets);
  const blockWidth = tiled ? await num(TAG.TileWidth) : width;
  const blockHeight = tiled ? await num(TAG.TileLength) : Math.min(await num(TAG.RowsPerStrip, height), height);
  if (!(blockWidth > 0 && blockHeight > 0)) throw new RasterError("corrupt", `block size ${blockWidth} × ${blockHeight}`);
  const blockCount = Math.ceil(width / blockWidth) * Math.ceil(height / blockHeight) * (planarConfiguration === 2 ? samplesPerPixel : 1);

  const offsetsEntry = byTag.get(tiled ? TAG.TileOffsets : TAG.StripOffsets);
  const countsEntry = byTag.get(tiled ? TAG.TileByteCounts : TAG.StripByteCounts);
  const kind = tiled ? "tile" : "strip";
  if (!offsetsEntry || !countsEntry) throw new RasterError("corrupt", `the image has no ${kind} offsets or byte counts`);
  if (offsetsEntry.count < blockCount || countsEntry.count < blockCount) {
    throw new RasterError("corrupt", `${blockCount} ${kind}s expected, the file lists ${Math.min(offsetsEntry.count, countsEntry.count)}`);
  }
  const offsets = (await readTag(offsetsEntry)) as number[];
  const counts = (await readTag(countsEntry)) as number[];
  const pixelBytes = planarConfiguration === 2 ? Math.max(...bitsPerSample) / 8 : bitsPerSample.reduce((a, b) => a + b, 0) / 8;
  const compression = await num(TAG.Compression, 1);
  const maxBlockBytes = Math.ceil(blockWidth * blockHeight * pixelBytes * (WORST_CASE_RATIO[compression] ?? 4)) + BLOCK_BYTES_SLACK;
  for (let i = 0; i < blockCount; i++) {
    if (counts[i] === 0) continue; // a sparse block: absent data
    if (offsets[i] + counts[i] > size) {
      throw new RasterError("corrupt", `${kind} ${i} (bytes ${offsets[i]}–${offsets[i] + counts[i]}) runs past the end of the ${size}-byte file; the file is truncated`);
    }
    if (counts[i] > maxBlockBytes) {
      throw new RasterError("corrupt", `${kind} ${i} claims ${counts[i]} bytes for a ${blockWidth} × ${blockHeight} block`);
    }
  }
  return {
    fileSize: size, bigTiff: big, littleEndian: r.little, directoryCount: seen.size,
    width, height, samplesPerPixel, bitsPerSample, sampleFormat,
    compression, predictor: await num(TAG.Predictor, 1),
    planarConfiguration, tiled, blockWidth, blockHeight, blockCount,
    blockOffsets: offsets.slice(0, blockCount), blockByteCounts: counts.slice(0, blockCount), tags,
  };
}
