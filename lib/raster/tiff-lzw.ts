// LZW decoding as TIFF 6.0 (Adobe 1992) §13 specifies it: MSB-first codes of 9–12 bits, Clear = 256,
// EndOfInformation = 257, the code width growing one code early ("early change", as libtiff writes).
// Each table entry is kept as a position and length in the output already written (an entry is the
// previous string plus the next string's first byte, and those bytes lie side by side in the output),
// so a code is decoded by one copy. Typed arrays, and the output bounded by the caller's buffer.
import { RasterError } from "@/lib/raster/errors";

const CLEAR = 256;
const EOI = 257;
const FIRST_FREE = 258;
const MAX_BITS = 12;
const TABLE_SIZE = 1 << MAX_BITS;
/** Strings at least this long are copied with copyWithin; shorter ones byte by byte (cheaper call-free). */
const COPY_WITHIN_FROM = 16;

/** Decodes `input` into `out`; returns the number of bytes written. Throws RasterError("corrupt")
 *  on an invalid code, on output beyond `out`, and on a stream that ends early without its end code. */
export function decodeTiffLzw(input: Uint8Array, out: Uint8Array): number {
  const start = new Int32Array(TABLE_SIZE);
  const length = new Uint16Array(TABLE_SIZE);
  // two zero bytes of padding let the bit reader load three bytes without a bounds test per code
  const bytes = new Uint8Array(input.length + 2);
  bytes.set(input);
  const totalBits = input.length * 8;
  const capacity = out.length;
  let bitPos = 0;
  let width = 9;
  let next = FIRST_FREE;
  let oldPos = -1; // output position and length of the previous code's string; -1 right after a clear
  let oldLen = 0;
  let pos = 0;
  for (;;) {
    if (bitPos + width > totalBits) {
      // libtiff tolerates a stream cut after the last full block; anything shorter is damage
      if (pos === capacity) return pos;
      throw new RasterError("corrupt", "an LZW block ends before its end code (truncated or damaged data)");
    }
    const byte = bitPos >>> 3;
    const word = (bytes[byte] << 16) | (bytes[byte + 1] << 8) | bytes[byte + 2];
    const code = (word >>> (24 - (bitPos & 7) - width)) & ((1 << width) - 1);
    bitPos += width;
    if (code === EOI) return pos;
    if (code === CLEAR) {
      width = 9;
      next = FIRST_FREE;
      oldPos = -1;
      continue;
    }
    let n: number;
    if (code < 256) {
      if (pos >= capacity) throw new RasterError("corrupt", "an LZW block decodes past its declared size");
      out[pos] = code;
      n = 1;
    } else if (oldPos < 0) {
      throw new RasterError("corrupt", `LZW code ${code} right after a clear code`);
    } else if (code < next) {
      n = length[code];
      if (pos + n > capacity) throw new RasterError("corrupt", "an LZW block decodes past its declared size");
      const s = start[code];
      if (n >= COPY_WITHIN_FROM) out.copyWithin(pos, s, s + n);
      else for (let i = 0; i < n; i++) out[pos + i] = out[s + i];
    } else if (code === next && next < TABLE_SIZE) {
      // the KwKwK case: the previous string followed by its own first byte
      n = oldLen + 1;
      if (pos + n > capacity) throw new RasterError("corrupt", "an LZW block decodes past its declared size");
      if (oldLen >= COPY_WITHIN_FROM) out.copyWithin(pos, oldPos, oldPos + oldLen);
      else for (let i = 0; i < oldLen; i++) out[pos + i] = out[oldPos + i];
      out[pos + oldLen] = out[oldPos];
    } else {
      throw new RasterError("corrupt", `LZW code ${code} is not yet defined (table holds ${next})`);
    }
    if (oldPos >= 0 && next < TABLE_SIZE) {
      // previous string + this string's first byte: the bytes from oldPos up to and including pos
      start[next] = oldPos;
      length[next] = oldLen + 1;
      next++;
      if (next >= (1 << width) - 1 && width < MAX_BITS) width++;
    }
    oldPos = pos;
    oldLen = n;
    pos += n;
  }
}
