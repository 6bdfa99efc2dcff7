// Fractional Brownian surface by spectral synthesis (Voss 1985; Saupe 1988, The Science of Fractal Images,
// Springer, ch. 2): Gaussian random Fourier coefficients with amplitude |k|^−(H+1), inverse FFT, real part.
import { makeGrid, type Grid } from "@/lib/raster/grid";
import { fft2d, isPowerOfTwo, signedFrequency } from "@/lib/fractal/fft2d";
import { normalDeviates } from "./mulberry32";

export interface FbmSurfaceOptions {
  /** Hurst exponent in (0, 1); the surface has D = 3 − H */
  hurst: number;
  seed: number;
  /** side in cells, a power of two */
  size: number;
  /** features elongated along x by this factor (amplitude taken at |(stretchX·kx, ky)|); 1 = isotropic */
  stretchX?: number;
  /** standard deviation of the output, in the output's units (default 100) */
  sigma?: number;
}

/** A periodic size × size fBm surface (Float32, mean 0, standard deviation `sigma`). */
export function fbmSurface(options: FbmSurfaceOptions): Grid<Float32Array> {
  const { hurst, seed, size } = options;
  const stretch = options.stretchX ?? 1, sigma = options.sigma ?? 100;
  if (!(hurst > 0 && hurst < 1)) throw new RangeError(`Hurst exponent must be in (0, 1), got ${hurst}`);
  if (!isPowerOfTwo(size)) throw new RangeError(`size must be a power of two, got ${size}`);
  if (!(stretch > 0)) throw new RangeError(`stretchX must be positive, got ${stretch}`);
  const gauss = normalDeviates(seed);
  const c = new Float64Array(2 * size * size);
  for (let y = 0; y < size; y++) {
    const ky = signedFrequency(y, size);
    for (let x = 0; x < size; x++) {
      const kx = signedFrequency(x, size) * stretch;
      const k2 = kx * kx + ky * ky;
      const i = 2 * (y * size + x);
      const re = gauss(), im = gauss(); // drawn for every bin so the sequence does not depend on H
      if (k2 === 0) continue; // no mean
      const amp = Math.pow(k2, -(hurst + 1) / 2);
      c[i] = amp * re; c[i + 1] = amp * im;
    }
  }
  fft2d(c, size, size, true);
  const out = new Float32Array(size * size);
  let sum = 0, sum2 = 0;
  for (let i = 0; i < out.length; i++) { const v = c[2 * i]; sum += v; sum2 += v * v; }
  const mean = sum / out.length, sd = Math.sqrt(sum2 / out.length - mean * mean);
  for (let i = 0; i < out.length; i++) out[i] = ((c[2 * i] - mean) / sd) * sigma;
  return makeGrid(out, size, size);
}
