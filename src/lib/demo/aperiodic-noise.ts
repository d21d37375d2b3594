/**
 * Aperiodic ("1/f") background for the demo: white Gaussian noise whose spectrum is shaped in the frequency
 * domain so that power falls as f^(−χ) (amplitude × f^(−χ/2)), the standard spectral-shaping way to make
 * power-law noise (e.g. Timmer & König, 1995, Astron Astrophys 300:707–710; citation from memory). Below `floorHz` the amplitude is
 * held flat so that the record is not dominated by a random walk, as a recording amplifier's high-pass would.
 */
import FFT from 'fft.js';
import type { Random } from './random';

const ffts = new Map<number, FFT>();
function fftOfSize(n: number): FFT {
  let f = ffts.get(n);
  if (f === undefined) {
    f = new FFT(n);
    ffts.set(n, f);
  }
  return f;
}

/**
 * Fills `out[c]` (length n) with zero-mean noise of RMS `rmsUv[c]` µV whose power spectral density is ∝ f^(−χ_c)
 * above `floorHz`. Two channels share each complex FFT: the transform of a + ib is split by Hermitian symmetry,
 * A[k] = (Z[k] + Z*[N−k])/2 and iB[k] = (Z[k] − Z*[N−k])/2, so each channel gets its own exponent.
 */
export function synthesizeAperiodic(
  out: Float32Array[],
  exponents: readonly number[],
  rmsUv: readonly number[],
  sampleRateHz: number,
  random: Random,
  floorHz = 1,
): void {
  const n = out[0].length;
  let size = 2;
  while (size < n) size <<= 1;
  const fft = fftOfSize(size);
  const z = new Float64Array(2 * size);
  const spectrum = new Float64Array(2 * size);
  const shaped = new Float64Array(2 * size);
  const hA = new Float64Array(size / 2 + 1);
  const hB = new Float64Array(size / 2 + 1);
  for (let c = 0; c < out.length; c += 2) {
    const pair = c + 1 < out.length;
    for (let i = 0; i < size; i++) {
      z[2 * i] = random.normal();
      z[2 * i + 1] = pair ? random.normal() : 0;
    }
    fft.transform(spectrum, z);
    const chiA = exponents[c];
    const chiB = pair ? exponents[c + 1] : chiA;
    for (let k = 1; k <= size / 2; k++) {
      const f = Math.max((k * sampleRateHz) / size, floorHz);
      hA[k] = Math.pow(f, -chiA / 2);
      hB[k] = Math.pow(f, -chiB / 2);
    }
    hA[0] = 0;
    hB[0] = 0;
    // Y[k] = H_a·A[k] + i·H_b·B[k] = p·Z[k] + q·Z*[N−k], p = (H_a + H_b)/2, q = (H_a − H_b)/2.
    for (let k = 0; k < size; k++) {
      const m = k <= size / 2 ? k : size - k;
      const p = (hA[m] + hB[m]) / 2;
      const q = (hA[m] - hB[m]) / 2;
      const j = k === 0 ? 0 : size - k;
      const re = spectrum[2 * k];
      const im = spectrum[2 * k + 1];
      const cre = spectrum[2 * j];
      const cim = -spectrum[2 * j + 1];
      shaped[2 * k] = p * re + q * cre;
      shaped[2 * k + 1] = p * im + q * cim;
    }
    fft.inverseTransform(z, shaped);
    fillScaled(out[c], z, 0, rmsUv[c]);
    if (pair) fillScaled(out[c + 1], z, 1, rmsUv[c + 1]);
  }
}

function fillScaled(target: Float32Array, z: Float64Array, part: 0 | 1, rms: number): void {
  const n = target.length;
  let mean = 0;
  for (let i = 0; i < n; i++) mean += z[2 * i + part];
  mean /= n;
  let ss = 0;
  for (let i = 0; i < n; i++) {
    const v = z[2 * i + part] - mean;
    ss += v * v;
  }
  const scale = ss > 0 ? rms / Math.sqrt(ss / n) : 0;
  for (let i = 0; i < n; i++) target[i] = (z[2 * i + part] - mean) * scale;
}
