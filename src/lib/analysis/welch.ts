import { AnalysisInputError } from './errors';
import { getRealDft } from './fft';
import { cos } from './portable-math';

/** Periodic Hann window `w[n] = 0.5 − 0.5·cos(2πn/N)`, n = 0 … N−1 (Harris, 1978, Proc. IEEE 66:51–83). */
export function hannWindow(length: number): Float64Array {
  const w = new Float64Array(length);
  for (let n = 0; n < length; n++) w[n] = 0.5 - 0.5 * cos((2 * Math.PI * n) / length);
  return w;
}

export interface WelchSpectrum {
  /** Bin frequencies `k·fs/N`, k = 0 … ⌊N/2⌋, Hz. */
  frequencies: Float64Array;
  /** One-sided power spectral density, µV²/Hz. */
  psd: Float64Array;
  /** Segments averaged. */
  segments: number;
}

/**
 * Welch's averaged periodogram (Welch, 1967, IEEE Trans. Audio Electroacoust. 15:70–73) as the contract defines
 * it: segments of N samples stepping by N − overlapSamples inside each `[start, end)` span of `spans` (flat pairs),
 * each segment's mean removed, periodic Hann window w, density `|FFT(x·w)|²/(fs·Σw²)` doubled except at 0 Hz and
 * Nyquist, averaged over segments. Units: µV²/Hz for µV input.
 */
export function welchPsd(
  samples: ArrayLike<number>,
  sampleRateHz: number,
  segmentSamples: number,
  overlapSamples: number,
  spans: ArrayLike<number> = [0, samples.length],
): WelchSpectrum {
  const n = segmentSamples;
  if (!Number.isInteger(n) || n < 2) throw new AnalysisInputError('spectrum.segment', `must span at least 2 samples (got ${n})`);
  const step = n - overlapSamples;
  if (!(step >= 1)) throw new AnalysisInputError('spectrum.overlap', `leaves no step between segments of ${n} samples`);
  const window = hannWindow(n);
  let windowPower = 0;
  for (let k = 0; k < n; k++) windowPower += window[k] * window[k];
  const dft = getRealDft(n);
  const bins = Math.floor(n / 2) + 1;
  const sum = new Float64Array(bins);
  const segment = new Float64Array(n);
  const spectrum = new Float64Array(2 * n);
  let segments = 0;
  for (let s = 0; s + 1 < spans.length; s += 2) {
    const end = spans[s + 1];
    for (let start = spans[s]; start + n <= end; start += step) {
      let mean = 0;
      for (let k = 0; k < n; k++) mean += samples[start + k];
      mean /= n;
      for (let k = 0; k < n; k++) segment[k] = (samples[start + k] - mean) * window[k];
      dft.forward(spectrum, segment);
      for (let k = 0; k < bins; k++) sum[k] += spectrum[2 * k] * spectrum[2 * k] + spectrum[2 * k + 1] * spectrum[2 * k + 1];
      segments++;
    }
  }
  const frequencies = new Float64Array(bins);
  const psd = new Float64Array(bins);
  const scale = 1 / (sampleRateHz * windowPower);
  for (let k = 0; k < bins; k++) {
    frequencies[k] = (k * sampleRateHz) / n;
    const oneSided = k === 0 || 2 * k === n ? 1 : 2;
    psd[k] = segments > 0 ? (oneSided * scale * sum[k]) / segments : NaN;
  }
  return { frequencies, psd, segments };
}
