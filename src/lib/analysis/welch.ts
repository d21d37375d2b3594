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

/** `welchPsd` of all spans together, of each group of spans, and (when asked) of each span alone. */
export interface NestedWelch {
  all: WelchSpectrum;
  byGroup: WelchSpectrum[];
  /** `[span·bins + k]`, each span's own density (NaN for a span without a whole segment); null unless asked for. */
  bySpan: Float64Array | null;
}

/**
 * One walk over the Welch segments of `spans` for three nested averages: all spans (`welchPsd(…, spans)`), each
 * group (`groupOfSpan[i]` ∈ 0 … groups − 1, e.g. one condition's epochs) and each span alone. Every average adds the
 * same segment powers in the same order as its own `welchPsd` call would, so the bits are the same; each segment is
 * transformed once instead of once per average.
 */
export function welchNested(
  samples: ArrayLike<number>,
  sampleRateHz: number,
  segmentSamples: number,
  overlapSamples: number,
  spans: ArrayLike<number>,
  groupOfSpan: ArrayLike<number>,
  groups: number,
  perSpan: boolean,
): NestedWelch {
  const bins = Math.floor(segmentSamples / 2) + 1;
  const spanCount = Math.floor(spans.length / 2);
  const all = new Float64Array(bins);
  const group = new Float64Array(groups * bins);
  const groupSegments = new Int32Array(groups);
  const span = perSpan ? new Float64Array(spanCount * bins) : null;
  const spanSegments = new Int32Array(spanCount);
  const { segments, scale } = eachSegment(samples, sampleRateHz, segmentSamples, overlapSamples, spans, (power, i) => {
    const g = groupOfSpan[i] * bins;
    for (let k = 0; k < bins; k++) all[k] += power[k];
    for (let k = 0; k < bins; k++) group[g + k] += power[k];
    if (span !== null) for (let k = 0, o = i * bins; k < bins; k++) span[o + k] += power[k];
    groupSegments[groupOfSpan[i]]++;
    spanSegments[i]++;
  });
  const frequencies = binFrequencies(bins, sampleRateHz, segmentSamples);
  const density = (sum: Float64Array, count: number): Float64Array => {
    for (let k = 0; k < bins; k++) sum[k] = count > 0 ? (scale[k] * sum[k]) / count : NaN;
    return sum;
  };
  const byGroup = Array.from({ length: groups }, (_, g) => ({ frequencies, psd: density(group.subarray(g * bins, (g + 1) * bins), groupSegments[g]).slice(), segments: groupSegments[g] }));
  if (span !== null) for (let i = 0; i < spanCount; i++) density(span.subarray(i * bins, (i + 1) * bins), spanSegments[i]);
  return { all: { frequencies, psd: density(all, segments), segments }, byGroup, bySpan: span };
}

function binFrequencies(bins: number, sampleRateHz: number, n: number): Float64Array {
  const frequencies = new Float64Array(bins);
  for (let k = 0; k < bins; k++) frequencies[k] = (k * sampleRateHz) / n;
  return frequencies;
}

// The one walk over Welch segments: demean, window, transform, hand |X_k|² (k = 0 … ⌊N/2⌋) and the span's index to `visit`.
function eachSegment(
  samples: ArrayLike<number>,
  sampleRateHz: number,
  n: number,
  overlapSamples: number,
  spans: ArrayLike<number>,
  visit: (power: Float64Array, span: number) => void,
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
      visit(power, s / 2);
      segments++;
    }
  }
  const scale = new Float64Array(bins);
  const base = 1 / (sampleRateHz * windowPower);
  for (let k = 0; k < bins; k++) scale[k] = (k === 0 || 2 * k === n ? 1 : 2) * base;
  return { segments, scale };
}
