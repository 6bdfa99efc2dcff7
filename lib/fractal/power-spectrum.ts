// Radially averaged power spectrum of a surface: P(|k|) ∝ |k|^−β with β = 2H + 2 = 8 − 2D
// (Voss 1988, in The Science of Fractal Images; Huang & Turcotte 1989, J. Geophys. Res. 94(B6)).
import type { Grid } from "@/lib/raster/grid";
import type { CellGeometry } from "@/lib/raster/cell-geometry";
import { fft2d } from "./fft2d";
import { deriveFromSlope, fitLogLog, type Derived, type LogLogFit, type ScalingRange } from "./loglog-fit";

/** Default number of log-spaced radial bins between the lowest frequency and the Nyquist frequency. */
export const DEFAULT_RADIAL_BINS = 20;

export interface PowerSpectrumOptions {
  bins?: number;
  /** user scaling range in metres (wavelength) */
  range?: ScalingRange;
}

export interface PowerSpectrumResult {
  method: string;
  units: { wavelength: "m"; power: string; dimension: "dimensionless" };
  /** how the grid was prepared, stated because each step changes the spectrum */
  preparation: string;
  /** FFT size (the grid zero-padded to powers of two) */
  fftWidth: number;
  fftHeight: number;
  /** bin-centre wavelength 1/|k|, m */
  wavelength: number[];
  /** mean (not summed) power of the frequencies in each annulus */
  power: number[];
  frequencies: number[];
  fit: LogLogFit;
  beta: Derived;
  dimension: Derived;
}

export function nextPowerOfTwo(n: number): number {
  let p = 2;
  while (p < n) p *= 2;
  return p;
}

/** Least-squares plane through the valid cells, as [a, b, c] in z = a + b·x + c·y (cells). */
export function fitPlane(grid: Grid<Float32Array>): [number, number, number] {
  const { data, width, height } = grid;
  let n = 0, sx = 0, sy = 0, sz = 0, sxx = 0, syy = 0, sxy = 0, sxz = 0, syz = 0;
  for (let y = 0; y < height; y++) for (let x = 0; x < width; x++) {
    const z = data[y * width + x];
    if (z !== z) continue;
    n++; sx += x; sy += y; sz += z; sxx += x * x; syy += y * y; sxy += x * y; sxz += x * z; syz += y * z;
  }
  if (n < 3) throw new RangeError(`a plane needs 3 valid cells, got ${n}`);
  // centred normal equations for b, c (Cramer's rule)
  const cxx = sxx - (sx * sx) / n, cyy = syy - (sy * sy) / n, cxy = sxy - (sx * sy) / n;
  const cxz = sxz - (sx * sz) / n, cyz = syz - (sy * sz) / n;
  const det = cxx * cyy - cxy * cxy;
  const b = det === 0 ? 0 : (cxz * cyy - cyz * cxy) / det;
  const c = det === 0 ? 0 : (cyz * cxx - cxz * cxy) / det;
  return [(sz - b * sx - c * sy) / n, b, c];
}

function hann(i: number, n: number): number {
  return n === 1 ? 1 : 0.5 - 0.5 * Math.cos((2 * Math.PI * i) / (n - 1));
}

export function powerSpectrum(grid: Grid<Float32Array>, geometry: CellGeometry, options: PowerSpectrumOptions = {}): PowerSpectrumResult {
  const { data, width, height } = grid;
  if (geometry.dx.length !== height) throw new RangeError(`cell geometry has ${geometry.dx.length} rows, grid has ${height}`);
  if (width < 8 || height < 8) throw new RangeError(`a spectrum needs at least 8×8 cells, got ${width}×${height}`);
  const bins = options.bins ?? DEFAULT_RADIAL_BINS;
  if (!Number.isInteger(bins) || bins < 4) throw new RangeError(`bins must be an integer ≥ 4, got ${bins}`);
  let dxMean = 0, dyMean = 0;
  for (let r = 0; r < height; r++) { dxMean += geometry.dx[r] / height; dyMean += geometry.dy[r] / height; }
  const [a, b, c] = fitPlane(grid);
  const nx = nextPowerOfTwo(width), ny = nextPowerOfTwo(height);
  const spec = new Float32Array(2 * nx * ny); // Float32 storage: half the memory, ample precision for a slope
  const wx = Float64Array.from({ length: width }, (_, i) => hann(i, width));
  let windowEnergy = 0;
  for (let y = 0; y < height; y++) {
    const wy = hann(y, height);
    for (let x = 0; x < width; x++) {
      const z = data[y * width + x];
      const w = wx[x] * wy;
      windowEnergy += w * w;
      if (z === z) spec[2 * (y * nx + x)] = (z - a - b * x - c * y) * w;
    }
  }
  fft2d(spec, nx, ny);
  // frequencies in cycles per metre; bins log-spaced from the lowest frequency to the Nyquist of the coarser axis
  const kx0 = 1 / (nx * dxMean), ky0 = 1 / (ny * dyMean);
  const kMin = Math.max(kx0, ky0), kMax = 0.5 / Math.max(dxMean, dyMean);
  const lnMin = Math.log(kMin), lnStep = (Math.log(kMax) - lnMin) / bins;
  const sum = new Float64Array(bins), count = new Float64Array(bins);
  for (let j = 0; j < ny; j++) {
    const ky = (j <= ny / 2 ? j : j - ny) * ky0;
    for (let i = 0; i < nx; i++) {
      const kx = (i <= nx / 2 ? i : i - nx) * kx0;
      const k = Math.sqrt(kx * kx + ky * ky);
      if (k < kMin || k > kMax) continue;
      const bin = Math.min(bins - 1, Math.floor((Math.log(k) - lnMin) / lnStep));
      const o = 2 * (j * nx + i);
      sum[bin] += spec[o] * spec[o] + spec[o + 1] * spec[o + 1];
      count[bin]++;
    }
  }
  const wavelength: number[] = [], power: number[] = [], frequencies: number[] = [];
  // power per unit frequency area: |F|²·ΔxΔy / (Σw²) (Parseval with the window's energy)
  const norm = (dxMean * dyMean) / windowEnergy;
  for (let i = 0; i < bins; i++) {
    if (count[i] === 0) continue;
    const kc = Math.exp(lnMin + (i + 0.5) * lnStep);
    wavelength.push(1 / kc); power.push((sum[i] / count[i]) * norm); frequencies.push(count[i]);
  }
  // P ∝ k^−β = λ^β, so the slope on (ln λ, ln P) is β
  const fit = fitLogLog(wavelength, power, { unit: "m", range: options.range });
  return {
    method: "radially averaged power spectrum (Voss 1988; Huang & Turcotte 1989)",
    units: { wavelength: "m", power: "z-units²·m²", dimension: "dimensionless" },
    preparation: "least-squares plane removed; separable Hann window; nodata set to 0 after detrending; " +
      "zero-padded to powers of two; mean power per log-spaced annulus (a sum would lower β by 1)",
    fftWidth: nx, fftHeight: ny, wavelength, power, frequencies, fit,
    beta: deriveFromSlope(fit, 0, 1), dimension: deriveFromSlope(fit, 4, -0.5),
  };
}
