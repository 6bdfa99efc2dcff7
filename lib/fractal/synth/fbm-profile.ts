// Fractional Brownian profile by spectral synthesis (Voss 1985; Saupe 1988, The Science of Fractal Images,
// ch. 2): amplitude |k|^−(H+1/2) so the power spectrum falls as |k|^−(2H+1), inverse FFT, real part.
import FFT from "fft.js";
import { isPowerOfTwo, signedFrequency } from "@/lib/fractal/fft2d";
import { normalDeviates } from "./mulberry32";

/** A periodic fBm profile of `length` samples (a power of two), mean 0, standard deviation `sigma`. D = 2 − H. */
export function fbmProfile(options: { hurst: number; seed: number; length: number; sigma?: number }): Float64Array {
  const { hurst, seed, length } = options;
  const sigma = options.sigma ?? 100;
  if (!(hurst > 0 && hurst < 1)) throw new RangeError(`Hurst exponent must be in (0, 1), got ${hurst}`);
  if (!isPowerOfTwo(length)) throw new RangeError(`length must be a power of two, got ${length}`);
  const gauss = normalDeviates(seed);
  const spec = new Float64Array(2 * length);
  for (let i = 0; i < length; i++) {
    const k = Math.abs(signedFrequency(i, length));
    const re = gauss(), im = gauss();
    if (k === 0) continue;
    const amp = Math.pow(k, -(hurst + 0.5));
    spec[2 * i] = amp * re; spec[2 * i + 1] = amp * im;
  }
  const out = new Float64Array(2 * length);
  new FFT(length).inverseTransform(out, spec);
  const z = new Float64Array(length);
  let sum = 0, sum2 = 0;
  for (let i = 0; i < length; i++) { z[i] = out[2 * i]; sum += z[i]; sum2 += z[i] * z[i]; }
  const mean = sum / length, sd = Math.sqrt(sum2 / length - mean * mean);
  for (let i = 0; i < length; i++) z[i] = ((z[i] - mean) / sd) * sigma;
  return z;
}
