// LZW decoding as TIFF 6.0 (Adobe 1992) §13 specifies it: MSB-first codes of 9–12 bits, Clear = 256,
// EndOfInformation = 257, the code width growing one code early ("early change", as libtiff writes).
// Typed arrays, and the output bounded by the caller's buffer: a stream cannot expand past its block.
import { RasterError } from "@/lib/raster/errors";

const CLEAR = 256;
const EOI = 257;
const FIRST_FREE = 258;
const MAX_BITS = 12;
const TABLE_SIZE = 1 << MAX_BITS;

/** Decodes `input` into `out`; returns the number of bytes written. Throws RasterError("corrupt")
 *  on an invalid code, on output beyond `out`, and on a stream that ends early without its end code. */
export function decodeTiffLzw(input: Uint8Array, out: Uint8Array): number {
  const prefix = new Int16Array(TABLE_SIZE);
  const suffix = new Uint8Array(TABLE_SIZE);
  const first = new Uint8Array(TABLE_SIZE);
  const length = new Uint16Array(TABLE_SIZE);
  for (let i = 0; i < 256; i++) {
    prefix[i] = -1;
    suffix[i] = i;
    first[i] = i;
    length[i] = 1;
  }
  // two zero bytes of padding let the bit reader load three bytes without a bounds test per code
  const bytes = new Uint8Array(input.length + 2);
  bytes.set(input);
  const totalBits = input.length * 8;
  let bitPos = 0;
  let width = 9;
  let next = FIRST_FREE;
  let old = -1;
  let pos = 0;
  const capacity = out.length;
  for (;;) {
    if (bitPos + width > totalBits) {
      // libtiff tolerates a stream cut after the last full block; anything shorter is damage
      if (pos === capacity) return pos;
      throw new RasterError("corrupt", "an LZW block ends before its end code (truncated or damaged data)");
    }
    // read `width` bits MSB-first from up to three bytes
    const byte = bitPos >>> 3;
    const word = (bytes[byte] << 16) | (bytes[byte + 1] << 8) | bytes[byte + 2];
    const code = (word >>> (24 - (bitPos & 7) - width)) & ((1 << width) - 1);
    bitPos += width;
    if (code === EOI) return pos;
    if (code === CLEAR) {
      width = 9;
      next = FIRST_FREE;
      old = -1;
      continue;
    }
    let emit: number;
    if (old === -1) {
      if (code > 255) throw new RasterError("corrupt", `LZW code ${code} right after a clear code`);
      if (pos >= capacity) throw new RasterError("corrupt", "an LZW block decodes past its declared size");
      out[pos++] = code;
      old = code;
      continue;
    } else if (code < next) {
      emit = code;
    } else if (code === next && next < TABLE_SIZE) {
      emit = -1; // the KwKwK case: the string of `old` followed by its own first byte
    } else {
      throw new RasterError("corrupt", `LZW code ${code} is not yet defined (table holds ${next})`);
    }
    const n = emit >= 0 ? length[emit] : length[old] + 1;
    if (pos + n > capacity) throw new RasterError("corrupt", "an LZW block decodes past its declared size");
    let p = pos + n - 1;
    if (emit < 0) {
      out[p--] = first[old];
      emit = old;
    }
    for (let c = emit; c >= 0; c = prefix[c]) out[p--] = suffix[c];
    if (next < TABLE_SIZE) {
      prefix[next] = old;
      suffix[next] = code < next ? first[code] : first[old];
      first[next] = first[old];
      length[next] = length[old] + 1;
      next++;
      if (next >= (1 << width) - 1 && width < MAX_BITS) width++;
    }
    pos += n;
    old = code;
  }
}
