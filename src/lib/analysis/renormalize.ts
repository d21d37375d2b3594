// Live re-normalization for the explorer: the same definitions as baseline.ts (analysis contract, "Baseline
// normalization"), arranged so a moved baseline costs F×T work (average scope) or one weighted pass over the
// stored trials (trial scope), with caller-owned output buffers.
import { baselineStats, zScoreAcrossTrials, type BaselineMethod, type BaselineSpread } from './baseline';
import { log10 } from './portable-math';

// 10·log10 P of each power array given to renormalizeAverage, kept per array (weakly, so it goes with the array):
// the explorer re-normalizes the same trial averages at every baseline move, and these logarithms do not depend
// on the baseline. Power arrays are results and never change in place; a few sampled points are still compared on
// every use, so an array written after all is noticed (and its logarithms taken again) in practice.
const decibelCache = new WeakMap<object, Float64Array>();
const CHECKED_POINTS = 16;

function decibelsOf(power: ArrayLike<number>): Float64Array {
  const n = power.length;
  const cached = decibelCache.get(power);
  if (cached !== undefined && cached.length === n) {
    let same = true;
    for (let k = 0; k < CHECKED_POINTS && same; k++) {
      const i = Math.floor((k * (n - 1)) / (CHECKED_POINTS - 1));
      if (n > 0 && !Object.is(cached[i], 10 * log10(power[i]))) same = false;
    }
    if (same) return cached;
  }
  const db = new Float64Array(n);
  for (let i = 0; i < n; i++) db[i] = 10 * log10(power[i]);
  decibelCache.set(power, db);
  return db;
}

/**
 * Scope `average` into `out[f·nTimes + t]`: each row of trial-averaged power P (µV²) against its own baseline
 * mean B and sample SD S over grid points first … last: decibel 10·log10(P/B), percent-change 100·(P − B)/B,
 * z-score (P − B)/S, power-ratio P/B. Same values as `normalizeAverage`, without allocating (decibels reuse
 * 10·log10 P from the first call on the same array: the same bits, one subtraction per point).
 */
export function renormalizeAverage(
  out: Float64Array,
  power: ArrayLike<number>,
  nTimes: number,
  first: number,
  last: number,
  method: BaselineMethod,
): void {
  const n = out.length;
  const db = method === 'decibel' ? decibelsOf(power) : null;
  for (let off = 0; off < n; off += nTimes) {
    const { mean, sd } = baselineStats(power, off, first, last);
    switch (method) {
      case 'decibel': {
        const c = 10 * log10(mean);
        const logs = db as Float64Array;
        for (let j = 0; j < nTimes; j++) out[off + j] = logs[off + j] - c;
        break;
      }
      case 'percent-change': {
        const k = 100 / mean;
        for (let j = 0; j < nTimes; j++) out[off + j] = k * (power[off + j] - mean);
        break;
      }
      case 'z-score': {
        for (let j = 0; j < nTimes; j++) out[off + j] = (power[off + j] - mean) / sd;
        break;
      }
      case 'power-ratio': {
        for (let j = 0; j < nTimes; j++) out[off + j] = power[off + j] / mean;
        break;
      }
    }
  }
}

/** Stored single-trial power of one channel and condition, `trials[(k·nFreqs + f)·nTimes + t]` µV². */
export interface TrialPower {
  trials: Float32Array;
  count: number;
  nFreqs: number;
  nTimes: number;
  /** mean over k of log10 P_k(f, t): does not depend on the baseline, so it is computed once (`prepareTrialPower`). */
  meanLog10: Float64Array;
}

/** Frequency rows from … to − 1 of every trial of `trials[(k·nFreqs + f)·nTimes + t]`, as `[(k·R + r)·nTimes + t]`. */
export function copyRows(trials: Float32Array, count: number, nFreqs: number, nTimes: number, from: number, to: number): Float32Array {
  const r = to - from;
  const out = new Float32Array(count * r * nTimes);
  for (let k = 0; k < count; k++) out.set(trials.subarray((k * nFreqs + from) * nTimes, (k * nFreqs + to) * nTimes), k * r * nTimes);
  return out;
}

/** Wraps stored trial power and precomputes `meanLog10`. */
export function prepareTrialPower(trials: Float32Array, count: number, nFreqs: number, nTimes: number): TrialPower {
  const size = nFreqs * nTimes;
  const meanLog10 = new Float64Array(size);
  for (let k = 0; k < count; k++) {
    const base = k * size;
    for (let i = 0; i < size; i++) meanLog10[i] += log10(trials[base + i]);
  }
  for (let i = 0; i < size; i++) meanLog10[i] /= count;
  return { trials, count, nFreqs, nTimes, meanLog10 };
}

/**
 * Scope `trial` into `out[f·nTimes + t]`: the mean over K trials of each trial normalized by its own B_k(f) and
 * S_k(f). Rearranged so the time loop is one multiply-add per trial:
 * decibel (1/K)·Σ 10·log10(P_k/B_k) = 10·mean log10 P − (10/K)·Σ log10 B_k;
 * power-ratio (1/K)·Σ P_k/B_k; percent-change 100·((1/K)·Σ P_k/B_k − 1); z-score (1/K)·Σ P_k/S_k − (1/K)·Σ B_k/S_k.
 * Equal to `normalizeTrials` up to rounding.
 */
export function renormalizeTrials(
  out: Float64Array,
  tp: TrialPower,
  first: number,
  last: number,
  method: BaselineMethod,
  spread: BaselineSpread = 'time',
  rows: readonly [number, number] | null = null,
): void {
  const { trials, count: K, nFreqs: nf, nTimes: nt, meanLog10 } = tp;
  const size = nf * nt;
  // Only frequency rows rows[0] … rows[1] − 1 (two threads can share one map); across-trials z-scores do all rows.
  const f0 = rows === null ? 0 : rows[0];
  const f1 = rows === null ? nf : rows[1];
  if (method === 'z-score' && spread === 'trials') {
    // (P̄ − B̄)/S with S the SD across trials of each trial's baseline mean (zScoreAcrossTrials, from held trials).
    const mean = new Float64Array(size);
    for (let k = 0; k < K; k++) for (let i = 0; i < size; i++) mean[i] += trials[k * size + i];
    for (let i = 0; i < size; i++) mean[i] /= K;
    const bk = new Float64Array(K * nf);
    for (let k = 0; k < K; k++) for (let f = 0; f < nf; f++) bk[k * nf + f] = baselineStats(trials, (k * nf + f) * nt, first, last).mean;
    out.set(zScoreAcrossTrials(mean, nt, bk, K));
    return;
  }
  if (method === 'decibel') {
    for (let f = f0; f < f1; f++) {
      let logB = 0;
      for (let k = 0; k < K; k++) {
        // B only (dB needs no S): Σp/n over the baseline points, in Float64.
        const off = (k * nf + f) * nt;
        let sum = 0;
        for (let j = first; j <= last; j++) sum += trials[off + j];
        logB += log10(sum / (last - first + 1));
      }
      const c = (10 * logB) / K;
      const off = f * nt;
      for (let j = 0; j < nt; j++) out[off + j] = 10 * meanLog10[off + j] - c;
    }
    return;
  }
  // Frequency outer, trial inner: one output row (nTimes doubles) stays in L1 cache while the trials stream past.
  out.fill(0, f0 * nt, f1 * nt);
  const zscore = method === 'z-score';
  const weights = new Float64Array(K);
  for (let f = f0; f < f1; f++) {
    const o = f * nt;
    let constant = 0;
    for (let k = 0; k < K; k++) {
      const { mean, sd } = baselineStats(trials, (k * nf + f) * nt, first, last);
      if (zscore) {
        weights[k] = 1 / (K * sd);
        constant -= mean / (K * sd);
      } else {
        weights[k] = 1 / (K * mean);
      }
    }
    // Four trials per sweep: a quarter of the loads and stores of the output row.
    let k = 0;
    for (; k + 4 <= K; k += 4) {
      const a = (k * nf + f) * nt;
      const b = a + nf * nt;
      const c = b + nf * nt;
      const d = c + nf * nt;
      const wa = weights[k];
      const wb = weights[k + 1];
      const wc = weights[k + 2];
      const wd = weights[k + 3];
      for (let j = 0; j < nt; j++) out[o + j] += wa * trials[a + j] + wb * trials[b + j] + wc * trials[c + j] + wd * trials[d + j];
    }
    for (; k < K; k++) {
      const a = (k * nf + f) * nt;
      const wa = weights[k];
      for (let j = 0; j < nt; j++) out[o + j] += wa * trials[a + j];
    }
    if (method === 'percent-change') {
      for (let j = 0; j < nt; j++) out[o + j] = 100 * (out[o + j] - 1);
    } else if (zscore) {
      for (let j = 0; j < nt; j++) out[o + j] += constant;
    }
  }
}
