// Zstandard frame layout (RFC 8878 §3.1): the most bytes the frames of a block can decode to, so a block
// that could expand past its tile is refused before the decoder allocates anything; and the content
// size a frame must declare so that the decoder takes its one-shot path.
import { RasterError } from "@/lib/raster/errors";

const FRAME_MAGIC = 0xfd2fb528;
const SKIPPABLE_MASK = 0xfffffff0;
const SKIPPABLE_MAGIC = 0x184d2a50;
/** Frames per block a sane writer produces; a forged stream of empty frames stops here. */
const MAX_FRAMES = 1024;
/** A compressed block regenerates at most this much (RFC 8878 §3.1.1.2.4, Block_Maximum_Size). */
const BLOCK_MAXIMUM_SIZE = 128 * 1024;

/**
 * The most bytes `data` can decode to: a frame's declared content size when it has one (the
 * decoder allocates that much up front), else the sum over its blocks of the raw and RLE sizes and
 * Block_Maximum_Size per compressed block (GDAL's streaming writer omits the content size).
 * RasterError when the frame layout is broken.
 */
export function zstdOutputBound(data: Uint8Array): number {
  let total = 0;
  zstdWalk(data, (bound) => { total += bound; });
  return total;
}

/** Walks the frames of `data`, calling `frame` with each one's output bound (see zstdOutputBound). */
function zstdWalk(data: Uint8Array, frame: (bound: number) => void): void {
  const view = new DataView(data.buffer, data.byteOffset, data.byteLength);
  let at = 0;
  for (let frames = 0; at < data.length; frames++) {
    if (frames >= MAX_FRAMES || at + 4 > data.length) throw new RasterError("corrupt", "a Zstd block has a broken frame layout");
    const magic = view.getUint32(at, true);
    if ((magic & SKIPPABLE_MASK) >>> 0 === SKIPPABLE_MAGIC) {
      if (at + 8 > data.length) throw new RasterError("corrupt", "a Zstd skippable frame is cut short");
      at += 8 + view.getUint32(at + 4, true);
      continue;
    }
    if (magic !== FRAME_MAGIC) throw new RasterError("corrupt", "a Zstd block does not start with a Zstd frame");
    const fhd = data[at + 4];
    const fcsFlag = fhd >> 6;
    const singleSegment = (fhd >> 5) & 1;
    const checksum = (fhd >> 2) & 1;
    const dictBytes = [0, 1, 2, 4][fhd & 3];
    const fcsBytes = [singleSegment ? 1 : 0, 2, 4, 8][fcsFlag];
    let p = at + 5 + (singleSegment ? 0 : 1) + dictBytes;
    if (p + fcsBytes > data.length) throw new RasterError("corrupt", "a Zstd frame header is cut short");
    let size = 0;
    if (fcsBytes === 1) size = data[p];
    else if (fcsBytes === 2) size = view.getUint16(p, true) + 256;
    else if (fcsBytes === 4) size = view.getUint32(p, true);
    else if (fcsBytes === 8) size = view.getUint32(p, true) + view.getUint32(p + 4, true) * 2 ** 32;
    p += fcsBytes;
    let blockBound = 0;
    // walk the blocks: 3-byte headers (last flag, type, size); RLE blocks carry one byte
    for (let last = 0; !last;) {
      if (p + 3 > data.length) throw new RasterError("corrupt", "a Zstd frame is cut short");
      const header = data[p] | (data[p + 1] << 8) | (data[p + 2] << 16);
      last = header & 1;
      const type = (header >> 1) & 3;
      if (type === 3) throw new RasterError("corrupt", "a Zstd block of reserved type");
      const blockSize = header >>> 3;
      blockBound += type === 2 ? BLOCK_MAXIMUM_SIZE : blockSize;
      p += 3 + (type === 1 ? 1 : blockSize);
    }
    frame(fcsBytes === 0 ? blockBound : size);
    at = p + (checksum ? 4 : 0);
  }
  if (at > data.length) throw new RasterError("corrupt", "a Zstd frame is cut short");
}

/**
 * `data` with its frame's content size declared: unchanged when the frame declares one, else with a
 * 4-byte Frame_Content_Size of `size` inserted (GDAL's streaming writer leaves it out), or refused when
 * `size` is null. A declared size makes the decoder take its one-shot path, which fails cleanly on
 * damaged data; its streaming path (zstddec 0.2) can loop without end on damaged data. Only blocks of
 * one frame are accepted (what GDAL writes).
 */
export function withContentSize(data: Uint8Array, size: number | null): Uint8Array {
  if (zstdFrameCount(data) !== 1 || new DataView(data.buffer, data.byteOffset, data.byteLength).getUint32(0, true) !== FRAME_MAGIC) {
    throw new RasterError("unsupported", "a Zstd block of other than one frame");
  }
  const fhd = data[4];
  if (fhd >> 6 !== 0 || (fhd >> 5) & 1) return data; // content size present (single-segment frames always carry it)
  if (size === null) throw new RasterError("unsupported", "a Zstd frame without its content size");
  const at = 6 + [0, 1, 2, 4][fhd & 3]; // after magic, descriptor, window byte and dictionary id
  const out = new Uint8Array(data.length + 4);
  out.set(data.subarray(0, at));
  out[4] = fhd | 0x80; // Frame_Content_Size_flag = 2: four bytes
  new DataView(out.buffer).setUint32(at, size, true);
  out.set(data.subarray(at), at + 4);
  return out;
}

function zstdFrameCount(data: Uint8Array): number {
  let count = 0;
  zstdWalk(data, () => count++);
  return count;
}
