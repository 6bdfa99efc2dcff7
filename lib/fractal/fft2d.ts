// Two-dimensional discrete Fourier transform by the row–column decomposition of a separable transform
// (e.g. Press et al. 2007, Numerical Recipes 3rd ed., ch. 12), each 1-D pass by the radix-4 FFT of fft.js.
import FFT from "fft.js";

/** Columns gathered per pass: 8 complex Float32 values fill one 64-byte cache line. */
const COLUMN_BATCH = 8;

export function isPowerOfTwo(n: number): boolean {
  return Number.isInteger(n) && n >= 2 && (n & (n - 1)) === 0;
}

/** In-place 2-D complex FFT of an interleaved (re, im) array of width × height, row-major. Each pass runs in
 *  Float64 row buffers, so a Float32 array halves the memory of a large transform at float precision.
 *  `inverse` divides by width·height (fft.js's inverse divides by each length). */
export function fft2d(data: Float64Array | Float32Array, width: number, height: number, inverse = false): void {
  if (!isPowerOfTwo(width) || !isPowerOfTwo(height)) {
    throw new RangeError(`FFT sizes must be powers of two ≥ 2, got ${width}×${height}`);
  }
  if (data.length !== 2 * width * height) throw new RangeError(`expected ${2 * width * height} values, got ${data.length}`);
  const rowFft = new FFT(width);
  const rowIn = new Float64Array(2 * width), rowOut = new Float64Array(2 * width);
  for (let y = 0; y < height; y++) {
    const off = 2 * y * width;
    rowIn.set(data.subarray(off, off + 2 * width));
    if (inverse) rowFft.inverseTransform(rowOut, rowIn); else rowFft.transform(rowOut, rowIn);
    data.set(rowOut, off);
  }
  // columns in batches: one pass over a row reads COLUMN_BATCH neighbouring columns from the same cache lines
  const colFft = new FFT(height);
  const batch = Math.min(COLUMN_BATCH, width);
  const colIn = Array.from({ length: batch }, () => new Float64Array(2 * height));
  const colOut = new Float64Array(2 * height);
  for (let x0 = 0; x0 < width; x0 += batch) {
    for (let y = 0; y < height; y++) {
      const o = 2 * (y * width + x0);
      for (let k = 0; k < batch; k++) { colIn[k][2 * y] = data[o + 2 * k]; colIn[k][2 * y + 1] = data[o + 2 * k + 1]; }
    }
    for (let k = 0; k < batch; k++) {
      if (inverse) colFft.inverseTransform(colOut, colIn[k]); else colFft.transform(colOut, colIn[k]);
      colIn[k].set(colOut);
    }
    for (let y = 0; y < height; y++) {
      const o = 2 * (y * width + x0);
      for (let k = 0; k < batch; k++) { data[o + 2 * k] = colIn[k][2 * y]; data[o + 2 * k + 1] = colIn[k][2 * y + 1]; }
    }
  }
}

/** Signed frequency index of FFT bin i of n (0, 1, …, n/2, −n/2+1, …, −1). */
export function signedFrequency(i: number, n: number): number {
  return i <= n / 2 ? i : i - n;
}
