import FFT from 'fft.js';
import { mulberry32 } from '../../src/lib/statistics/map-test';

/** mulberry32 (Tommy Ettinger, public domain): the statistics core's own generator, uniform in [0, 1). */
export const seededUniform: (seed: number) => () => number = mulberry32;

/** Standard normal deviates by the Box–Muller transform (Box & Muller, 1958, Ann. Math. Stat. 29:610–611). */
export function seededNormal(seed: number): () => number {
  const u = seededUniform(seed);
  return () => {
    const u1 = 1 - u();
    const u2 = u();
    return Math.sqrt(-2 * Math.log(u1)) * Math.cos(2 * Math.PI * u2);
  };
}

/**
 * Gaussian colored noise with power spectral density ∝ f^(−exponent) (for f > 0): complex Gaussian Fourier
 * coefficients scaled by f^(−exponent/2), Hermitian-symmetric, inverse FFT. `length` must be a power of two.
 */
export function coloredNoise(length: number, sampleRateHz: number, exponent: number, seed: number): Float64Array {
  const normal = seededNormal(seed);
  const fft = new FFT(length);
  const spectrum = new Float64Array(2 * length);
  for (let k = 1; k <= length / 2; k++) {
    const f = (k * sampleRateHz) / length;
    const a = Math.pow(f, -exponent / 2);
    const re = a * normal();
    const im = k === length / 2 ? 0 : a * normal();
    spectrum[2 * k] = re;
    spectrum[2 * k + 1] = im;
    if (k < length / 2) {
      spectrum[2 * (length - k)] = re;
      spectrum[2 * (length - k) + 1] = -im;
    }
  }
  const out = new Float64Array(2 * length);
  fft.inverseTransform(out, spectrum);
  const x = new Float64Array(length);
  for (let i = 0; i < length; i++) x[i] = out[2 * i] * length;
  return x;
}

/** Direct O(n²) DFT of real input, interleaved complex: the textbook definition X_k = Σ x_n e^{−2πikn/N}. */
export function directDft(x: ArrayLike<number>): Float64Array {
  const n = x.length;
  const out = new Float64Array(2 * n);
  for (let k = 0; k < n; k++) {
    let re = 0;
    let im = 0;
    for (let j = 0; j < n; j++) {
      const angle = (-2 * Math.PI * ((k * j) % n)) / n;
      re += x[j] * Math.cos(angle);
      im += x[j] * Math.sin(angle);
    }
    out[2 * k] = re;
    out[2 * k + 1] = im;
  }
  return out;
}
