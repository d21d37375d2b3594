import { roundHalfUp } from './rounding';
import { log10 } from './portable-math';

export type BaselineMethod = 'decibel' | 'percent-change' | 'z-score' | 'power-ratio';
export type BaselineScope = 'average' | 'trial';
/** Where a z-score's S comes from: the baseline's time points (`time`, the contract's) or the trials (`trials`). */
export type BaselineSpread = 'time' | 'trials';

export interface BaselineIndices {
  first: number;
  last: number;
}

/**
 * Epoch grid indices of the baseline, `round((start − epochs.start)·fs)` to `round((end − epochs.start)·fs)` inclusive, halves up
 * (analysis contract, "Baseline normalization"). Times in seconds, rate in Hz.
 */
export function baselineIndices(startSeconds: number, endSeconds: number, epochStartSeconds: number, sampleRateHz: number): BaselineIndices {
  return {
    first: roundHalfUp((startSeconds - epochStartSeconds) * sampleRateHz),
    last: roundHalfUp((endSeconds - epochStartSeconds) * sampleRateHz),
  };
}

/**
 * Baseline grid indices clamped to an `nTimes`-point epoch: `baselineIndices`, then each index kept inside
 * 0 … nTimes − 1. A checked recipe's baseline lies inside the epoch to 1e-9 s, so this only absorbs rounding at the
 * ends; the Maps screen's dragged band uses the same rule.
 */
export function baselinePointsIn(startSeconds: number, endSeconds: number, epochStartSeconds: number, sampleRateHz: number, nTimes: number): BaselineIndices {
  const b = baselineIndices(startSeconds, endSeconds, epochStartSeconds, sampleRateHz);
  const clamp = (j: number) => Math.max(0, Math.min(nTimes - 1, j));
  return { first: clamp(b.first), last: clamp(b.last) };
}

export interface BaselineStats {
  /** B, mean power over the baseline points (µV²). */
  mean: number;
  /** S, sample standard deviation (n − 1) over the baseline points; NaN for a single point. */
  sd: number;
}

/** B = Σp/n and S = √(Σ(p − B)²/(n − 1)) over `row[offset+first … offset+last]`, summed in Float64. */
export function baselineStats(row: ArrayLike<number>, offset: number, first: number, last: number): BaselineStats {
  const n = last - first + 1;
  let sum = 0;
  for (let j = first; j <= last; j++) sum += row[offset + j];
  const mean = sum / n;
  let ss = 0;
  for (let j = first; j <= last; j++) {
    const d = row[offset + j] - mean;
    ss += d * d;
  }
  return { mean, sd: n > 1 ? Math.sqrt(ss / (n - 1)) : NaN };
}

/**
 * One normalized value: decibel `10·log10(P/B)` (IEC 60027-3), percent-change `100·(P − B)/B`, z-score
 * `(P − B)/S`, power-ratio `P/B` (analysis contract table). Undefined cases (B = 0, S = 0) give ±Infinity or NaN, never a number.
 */
export function normalizeValue(method: BaselineMethod, p: number, mean: number, sd: number): number {
  switch (method) {
    case 'decibel':
      return 10 * log10(p / mean);
    case 'percent-change':
      return (100 * (p - mean)) / mean;
    case 'z-score':
      return (p - mean) / sd;
    case 'power-ratio':
      return p / mean;
  }
}

/** Writes `normalizeValue(method, row[rowOffset+j], B, S)` into `out[outOffset+j]` for j < length. */
export function normalizeRow(
  out: Float64Array,
  outOffset: number,
  row: ArrayLike<number>,
  rowOffset: number,
  length: number,
  method: BaselineMethod,
  stats: BaselineStats,
): void {
  const { mean, sd } = stats;
  for (let j = 0; j < length; j++) out[outOffset + j] = normalizeValue(method, row[rowOffset + j], mean, sd);
}

/**
 * Scope `average`: each frequency row of trial-averaged power (`power[f·nTimes + t]`, µV²) normalized by the B
 * and S of its own baseline points.
 */
export function normalizeAverage(power: Float64Array, nTimes: number, baseline: BaselineIndices, method: BaselineMethod): Float64Array {
  const out = new Float64Array(power.length);
  for (let off = 0; off < power.length; off += nTimes) {
    normalizeRow(out, off, power, off, nTimes, method, baselineStats(power, off, baseline.first, baseline.last));
  }
  return out;
}

/**
 * Scope `trial`: each trial's rows normalized by that trial's own B and S, then averaged over trials. Reference
 * form over stored trials; `decomposeChannel` computes the same sums as trials are produced.
 */
export function normalizeTrials(trials: ArrayLike<number>[], nTimes: number, baseline: BaselineIndices, method: BaselineMethod): Float64Array {
  const size = trials[0].length;
  const sum = new Float64Array(size);
  const row = new Float64Array(nTimes);
  for (const trial of trials) {
    for (let off = 0; off < size; off += nTimes) {
      normalizeRow(row, 0, trial, off, nTimes, method, baselineStats(trial, off, baseline.first, baseline.last));
      for (let j = 0; j < nTimes; j++) sum[off + j] += row[j];
    }
  }
  for (let i = 0; i < size; i++) sum[i] /= trials.length;
  return sum;
}

/**
 * z-score with the spread across trials (recipe `baseline.spread: "trials"`, DEVELOPERS.md): per frequency f,
 * `B_k` is trial k's mean power over the baseline points, `B̄ = (1/K)·Σ_k B_k`, `S = √(Σ_k (B_k − B̄)²/(K − 1))`,
 * and `z = (P̄ − B̄)/S` for the trial-averaged power P̄. The same for scope `average` and `trial`, since
 * `(1/K)·Σ_k (P_k − B_k)/S = (P̄ − B̄)/S`. `trialBaselines[k·nFreqs + f]` holds B_k(f).
 */
export function zScoreAcrossTrials(power: Float64Array, nTimes: number, trialBaselines: Float64Array, trials: number): Float64Array {
  const nf = power.length / nTimes;
  const out = new Float64Array(power.length);
  for (let f = 0; f < nf; f++) {
    let mean = 0;
    for (let k = 0; k < trials; k++) mean += trialBaselines[k * nf + f];
    mean /= trials;
    let ss = 0;
    for (let k = 0; k < trials; k++) {
      const d = trialBaselines[k * nf + f] - mean;
      ss += d * d;
    }
    const sd = trials > 1 ? Math.sqrt(ss / (trials - 1)) : NaN;
    const off = f * nTimes;
    for (let j = 0; j < nTimes; j++) out[off + j] = (power[off + j] - mean) / sd;
  }
  return out;
}
