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
  const bins = Math.floor(segmentSamples / 2) + 1;
  const sum = new Float64Array(bins);
  const { segments, scale } = eachSegment(samples, sampleRateHz, segmentSamples, overlapSamples, spans, (power) => {
    for (let k = 0; k < bins; k++) sum[k] += power[k];
  });
  const frequencies = binFrequencies(bins, sampleRateHz, segmentSamples);
  const psd = new Float64Array(bins);
  for (let k = 0; k < bins; k++) psd[k] = segments > 0 ? (scale[k] * sum[k]) / segments : NaN;
  return { frequencies, psd, segments };
}

/** Each Welch segment's own periodogram, for resampling segments (e.g. a bootstrap over segments). */
export interface WelchSegments {
  frequencies: Float64Array;
  /** `[segment·bins + k]`: |FFT(x·w)|² of each segment, before the density scale. */
  powers: Float64Array;
  /** Per bin, the density factor: 1/(fs·Σw²), doubled except at 0 Hz and Nyquist. */
  scale: Float64Array;
  segments: number;
}

/**
 * The segments `welchPsd` averages, kept apart: `welchPsd` equals `scale[k]·mean over segments of powers[·, k]`
 * (the same sums in the same order when all segments are taken once).
 */
export function welchSegments(
  samples: ArrayLike<number>,
  sampleRateHz: number,
  segmentSamples: number,
  overlapSamples: number,
  spans: ArrayLike<number> = [0, samples.length],
): WelchSegments {
  const bins = Math.floor(segmentSamples / 2) + 1;
  const rows: Float64Array[] = [];
  const { segments, scale } = eachSegment(samples, sampleRateHz, segmentSamples, overlapSamples, spans, (power) => rows.push(power.slice(0, bins)));
  const powers = new Float64Array(segments * bins);
  rows.forEach((r, i) => powers.set(r, i * bins));
  return { frequencies: binFrequencies(bins, sampleRateHz, segmentSamples), powers, scale, segments };
}

function binFrequencies(bins: number, sampleRateHz: number, n: number): Float64Array {
  const frequencies = new Float64Array(bins);
  for (let k = 0; k < bins; k++) frequencies[k] = (k * sampleRateHz) / n;
  return frequencies;
}

// The one walk over Welch segments: demean, window, transform, hand |X_k|² (k = 0 … ⌊N/2⌋) to `visit`.
function eachSegment(
  samples: ArrayLike<number>,
  sampleRateHz: number,
  n: number,
  overlapSamples: number,
  spans: ArrayLike<number>,
  visit: (power: Float64Array) => void,
): { segments: number; scale: Float64Array } {
  if (!Number.isInteger(n) || n < 2) throw new AnalysisInputError('spectrum.segment', `must span at least 2 samples (got ${n})`);
  const step = n - overlapSamples;
  if (!(step >= 1)) throw new AnalysisInputError('spectrum.overlap', `leaves no step between segments of ${n} samples`);
  const window = hannWindow(n);
  let windowPower = 0;
  for (let k = 0; k < n; k++) windowPower += window[k] * window[k];
  const dft = getRealDft(n);
  const bins = Math.floor(n / 2) + 1;
  const power = new Float64Array(bins);
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
      for (let k = 0; k < bins; k++) power[k] = spectrum[2 * k] * spectrum[2 * k] + spectrum[2 * k + 1] * spectrum[2 * k + 1];
      visit(power);
      segments++;
    }
  }
  const scale = new Float64Array(bins);
  const base = 1 / (sampleRateHz * windowPower);
  for (let k = 0; k < bins; k++) scale[k] = (k === 0 || 2 * k === n ? 1 : 2) * base;
  return { segments, scale };
}
