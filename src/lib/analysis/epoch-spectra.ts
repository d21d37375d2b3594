import { welchPsd } from './welch';

export interface EpochSpectra {
  /** Welch bins inside the range, Hz. */
  frequencies: Float64Array;
  /** `perTrial[k·bins + i]`, µV²/Hz, one Welch spectrum per epoch. */
  perTrial: Float64Array;
  /** Mean over epochs of `perTrial`, µV²/Hz. */
  mean: Float64Array;
  trials: number;
}

/**
 * One Welch spectrum per epoch (analysis contract, "Power spectrum": periodic Hann, segment mean removed,
 * one-sided density; Welch, 1967) over the samples `[start, start + epochSamples)` of each epoch, keeping the bins
 * `k·fs/N` inside `rangeHz` inclusive, and their mean over epochs. The segment is shortened to the epoch when the
 * epoch is shorter.
 */
export function epochSpectra(
  samples: Float32Array,
  sampleRateHz: number,
  epochStarts: ArrayLike<number>,
  epochSamples: number,
  segmentSamples: number,
  overlapSamples: number,
  rangeHz: readonly [number, number],
): EpochSpectra {
  const n = Math.min(segmentSamples, epochSamples);
  const overlap = Math.min(overlapSamples, n - 1);
  return collectEpochSpectra(epochStarts.length, (k) => {
    const s = epochStarts[k];
    return welchPsd(samples, sampleRateHz, n, overlap, [s, s + epochSamples]);
  }, rangeHz);
}

/**
 * `epochSpectra` from each epoch's Welch density already made (`welchNested`'s `bySpan`, `[k·bins + i]` over the
 * bins `frequencies`): the same clipping to `rangeHz` and the same mean, so the same bits.
 */
export function epochSpectraFrom(frequencies: Float64Array, perEpoch: Float64Array, epochs: number, rangeHz: readonly [number, number]): EpochSpectra {
  const bins = frequencies.length;
  return collectEpochSpectra(epochs, (k) => ({ frequencies, psd: perEpoch.subarray(k * bins, (k + 1) * bins) }), rangeHz);
}

// Epoch k's full Welch density from `spectrumOf(k)`, k = 0 … K − 1 in order, kept inside `rangeHz` and averaged.
function collectEpochSpectra(K: number, spectrumOf: (k: number) => { frequencies: Float64Array; psd: Float64Array }, rangeHz: readonly [number, number]): EpochSpectra {
  let frequencies = new Float64Array(0);
  let perTrial = new Float64Array(0);
  let k0 = 0;
  let bins = 0;
  for (let k = 0; k < K; k++) {
    const w = spectrumOf(k);
    if (k === 0) {
      while (k0 < w.frequencies.length && w.frequencies[k0] < rangeHz[0] - 1e-9) k0++;
      let k1 = k0;
      while (k1 < w.frequencies.length && w.frequencies[k1] <= rangeHz[1] + 1e-9) k1++;
      bins = k1 - k0;
      frequencies = w.frequencies.slice(k0, k1);
      perTrial = new Float64Array(K * bins);
    }
    perTrial.set(w.psd.subarray(k0, k0 + bins), k * bins);
  }
  const mean = new Float64Array(bins);
  for (let k = 0; k < K; k++) for (let i = 0; i < bins; i++) mean[i] += perTrial[k * bins + i];
  for (let i = 0; i < bins; i++) mean[i] /= Math.max(1, K);
  return { frequencies, perTrial, mean, trials: K };
}
