import { AnalysisInputError } from '../errors';
import { getFft, nextPowerOfTwo } from '../fft';
import { exp, log10, pow } from '../portable-math';
import { seededGaussian } from '../random';

/** A Gaussian bump above the aperiodic line in log10 power (the peak model of Donoghue et al., 2020, Nat Neurosci 23:1655). */
export interface SimulatedPeak {
  centreHz: number;
  /** Standard deviation of the bump, Hz. */
  widthHz: number;
  /** Height in log10 power above the aperiodic line (0.5 ≈ ×3.2). */
  heightLog10: number;
}

/** What the slope bench's generator draws: our own synthesis, documented here and in DEVELOPERS.md. */
export interface SimulationSettings {
  /** log10 µV²/Hz of the aperiodic part at 1 Hz (with knee 0). */
  offset: number;
  exponent: number;
  /** Knee constant k (Hz^exponent); 0 or absent for a plain power law. */
  knee?: number;
  peaks?: SimulatedPeak[];
  durationSeconds: number;
  sampleRateHz: number;
  /** Standard deviation of white noise added in time, µV (0 or absent for none). */
  noiseMicrovolts?: number;
  seed: number;
}

/** The model's one-sided density at f: `10^(offset − log10(knee + f^χ) + Σ h·exp(−(f − c)²/(2w²)))` µV²/Hz. */
export function simulatedDensity(s: Pick<SimulationSettings, 'offset' | 'exponent' | 'knee' | 'peaks'>, f: number): number {
  let y = s.offset - log10((s.knee ?? 0) + pow(f, s.exponent));
  for (const p of s.peaks ?? []) y += p.heightLog10 * exp(-((f - p.centreHz) * (f - p.centreHz)) / (2 * p.widthHz * p.widthHz));
  return pow(10, y);
}

/**
 * A time series whose expected one-sided power spectral density is `simulatedDensity` (µV²/Hz): Fourier
 * coefficients X_k = c_k·(a + ib) with a, b standard normal and c_k = √(S(f_k)·fs·M/4), Hermitian-symmetric, inverse
 * FFT of size M = the next power of two, first N samples kept (spectral synthesis of coloured Gaussian noise, common
 * practice, e.g. Timmer & König, 1995, Astron. Astrophys. 300:707). Seeded: one seed, one series, on every engine.
 */
export function simulateAperiodic(s: SimulationSettings): Float32Array {
  const fs = s.sampleRateHz;
  if (!(fs > 0) || !Number.isFinite(fs)) throw new AnalysisInputError('sampleRateHz', `must be a positive number of Hz (got ${fs})`);
  const n = Math.round(s.durationSeconds * fs);
  if (!(n >= 16)) throw new AnalysisInputError('durationSeconds', `gives ${n} samples at ${fs} Hz; at least 16 are needed`);
  if (n > 1 << 24) throw new AnalysisInputError('durationSeconds', `gives ${n} samples; at most ${1 << 24} are simulated at once`);
  if (!(s.exponent >= 0 && s.exponent <= 6)) throw new AnalysisInputError('exponent', `must lie between 0 and 6 (got ${s.exponent})`);
  if ((s.knee ?? 0) < 0) throw new AnalysisInputError('knee', `must not be negative (got ${s.knee})`);
  const m = nextPowerOfTwo(n);
  const gauss = seededGaussian(s.seed);
  const spectrum = new Float64Array(2 * m);
  for (let k = 1; k <= m / 2; k++) {
    const c = Math.sqrt((simulatedDensity(s, (k * fs) / m) * fs * m) / 4);
    const re = c * gauss();
    const im = k === m / 2 ? 0 : c * gauss();
    spectrum[2 * k] = re;
    spectrum[2 * k + 1] = im;
    if (k < m / 2) {
      spectrum[2 * (m - k)] = re;
      spectrum[2 * (m - k) + 1] = -im;
    }
  }
  const out = new Float64Array(2 * m);
  getFft(m).inverseTransform(out, spectrum); // the inverse divides by m, matching the X_k convention above
  const x = new Float32Array(n);
  const noise = s.noiseMicrovolts ?? 0;
  for (let i = 0; i < n; i++) x[i] = out[2 * i] + (noise > 0 ? noise * gauss() : 0);
  return x;
}
