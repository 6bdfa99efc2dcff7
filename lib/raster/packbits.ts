// PackBits run-length decoding (Apple 1984, Technical Note TN1023; TIFF 6.0 §9), bounded by the output buffer.
import { RasterError } from "@/lib/raster/errors";

/** Decodes `input` into `out`; returns the bytes written. A header n in 0..127 copies n+1 literal
 *  bytes, −127..−1 repeats the next byte 1−n times, −128 is a no-op. */
export function decodePackBits(input: Uint8Array, out: Uint8Array): number {
  let i = 0;
  let pos = 0;
  while (i < input.length && pos < out.length) {
    const n = (input[i++] << 24) >> 24;
    if (n >= 0) {
      if (i + n + 1 > input.length || pos + n + 1 > out.length) throw new RasterError("corrupt", "a PackBits literal run overruns its block");
      out.set(input.subarray(i, i + n + 1), pos);
      i += n + 1;
      pos += n + 1;
    } else if (n !== -128) {
      if (i >= input.length || pos + 1 - n > out.length) throw new RasterError("corrupt", "a PackBits repeat run overruns its block");
      out.fill(input[i++], pos, pos + 1 - n);
      pos += 1 - n;
    }
  }
  return pos;
}
