// Live re-normalization for the explorer: the same definitions as baseline.ts (analysis contract, "Baseline
// normalization"), arranged so a moved baseline costs F×T work (average scope) or, in trial scope, one pass over
// the trials' baseline points plus a weighted sum over their coarse samples (percent change, power ratio) or their
// stored rows (z-score), with caller-owned output buffers.
import { baselineStats, zScoreAcrossTrials, type BaselineMethod, type BaselineSpread } from './baseline';
import type { CoarseTrials } from './decompose';
import { getFft } from './fft';
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
  /**
   * The same trials' coarse power samples (decompose.ts `CoarseTrials`, one condition's `samples`), or null. With
   * them percent change and power ratio cost S_f per trial and frequency instead of nTimes (see renormalizeTrials).
   */
  coarse: CoarseRows | null;
  /**
   * With coarse samples: Σ of each stored row over blocks of `BASELINE_BLOCK` points, `[(k·nFreqs + f)·blocks + b]`
   * (Float64), so a baseline mean reads the blocks it covers and the points at its two ends; else null.
   */
  blockSums: Float64Array | null;
}

/** Points per block of `TrialPower.blockSums`. */
export const BASELINE_BLOCK = 32;

/** One condition's coarse samples `[k·offsets[F] + offsets[f] + s]` with their layout (see `CoarseTrials`). */
export type CoarseRows = Omit<CoarseTrials, 'samples'> & { samples: Float32Array };

/** Frequency rows from … to − 1 of every trial of `trials[(k·nFreqs + f)·nTimes + t]`, as `[(k·R + r)·nTimes + t]`. */
export function copyRows(trials: Float32Array, count: number, nFreqs: number, nTimes: number, from: number, to: number): Float32Array {
  const r = to - from;
  const out = new Float32Array(count * r * nTimes);
  for (let k = 0; k < count; k++) out.set(trials.subarray((k * nFreqs + from) * nTimes, (k * nFreqs + to) * nTimes), k * r * nTimes);
  return out;
}

/** Wraps stored trial power (and its coarse samples, if given) and precomputes `meanLog10`. */
export function prepareTrialPower(trials: Float32Array, count: number, nFreqs: number, nTimes: number, coarse: CoarseRows | null = null): TrialPower {
  const size = nFreqs * nTimes;
  const meanLog10 = new Float64Array(size);
  for (let k = 0; k < count; k++) {
    const base = k * size;
    for (let i = 0; i < size; i++) meanLog10[i] += log10(trials[base + i]);
  }
  for (let i = 0; i < size; i++) meanLog10[i] /= count;
  let blockSums: Float64Array | null = null;
  if (coarse !== null) {
    const blocks = Math.ceil(nTimes / BASELINE_BLOCK);
    blockSums = new Float64Array(count * nFreqs * blocks);
    for (let r = 0; r < count * nFreqs; r++) {
      for (let j = 0; j < nTimes; j++) blockSums[r * blocks + Math.floor(j / BASELINE_BLOCK)] += trials[r * nTimes + j];
    }
  }
  return { trials, count, nFreqs, nTimes, meanLog10, coarse, blockSums };
}

/**
 * Scope `trial` into `out[f·nTimes + t]`: the mean over K trials of each trial normalized by its own B_k(f) and
 * S_k(f). Rearranged so the time loop is one multiply-add per trial:
 * decibel (1/K)·Σ 10·log10(P_k/B_k) = 10·mean log10 P − (10/K)·Σ log10 B_k;
 * power-ratio (1/K)·Σ P_k/B_k; percent-change 100·((1/K)·Σ P_k/B_k − 1); z-score (1/K)·Σ P_k/S_k − (1/K)·Σ B_k/S_k.
 * With coarse samples (`tp.coarse`), the linear methods sum w_k·p_k[s] over S_f coarse points per trial and
 * interpolate once per frequency (exact: see decompose.ts `CoarseTrials`) instead of sweeping nTimes per trial.
 * Equal to `normalizeTrials` up to rounding (float32 storage: ~1e-6 relative).
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
  const coarse = zscore ? null : tp.coarse;
  const points = coarse === null ? 0 : coarse.offsets[nf];
  // Linear methods: every B_k(f) first, trial by trial (a trial's rows lie together), then the weighted sums.
  const means = zscore ? null : new Float64Array(K * nf);
  const sums = coarse === null ? null : tp.blockSums;
  if (means !== null) {
    for (let k = 0; k < K; k++) {
      for (let f = f0; f < f1; f++) {
        const r = k * nf + f;
        means[f * K + k] = sums === null ? baselineMean(trials, r * nt, first, last) : blockMean(trials, sums, r, nt, first, last);
      }
    }
  }
  // A coarse row waiting for a partner of the same period (see interpolateTwo).
  let waiting: { f: number; acc: Float64Array } | null = null;
  for (let f = f0; f < f1; f++) {
    const o = f * nt;
    let constant = 0;
    for (let k = 0; k < K; k++) {
      if (zscore) {
        const { mean, sd } = baselineStats(trials, (k * nf + f) * nt, first, last);
        weights[k] = 1 / (K * sd);
        constant -= mean / (K * sd);
      } else {
        // B_k only (linear methods need no S_k).
        weights[k] = 1 / (K * (means as Float64Array)[f * K + k]);
      }
    }
    const s = coarse === null ? 0 : coarse.points[f];
    if (coarse !== null && s > 0) {
      // Σ_k w_k·P_k(t) is the band-limited interpolation of Σ_k w_k·p_k[s] (decompose.ts, `CoarseTrials`): exact,
      // so S_f multiply-adds per trial replace nTimes. The interpolation waits for a second row of the same period
      // (two real rows share one complex transform), and the method's last step follows it.
      const acc = coarseSum(coarse, points, K, f, s, weights);
      if (waiting === null) {
        waiting = { f, acc: acc.slice() };
      } else if (coarse.periods[waiting.f] === coarse.periods[f]) {
        interpolateTwo(out, waiting.f * nt, waiting.acc, o, acc, nt, coarse.periods[f]);
        finishRow(out, waiting.f * nt, nt, method, 0);
        finishRow(out, o, nt, method, 0);
        waiting = null;
      } else {
        interpolateTwo(out, waiting.f * nt, waiting.acc, -1, null, nt, coarse.periods[waiting.f]);
        finishRow(out, waiting.f * nt, nt, method, 0);
        waiting = { f, acc: acc.slice() };
      }
      continue;
    } else {
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
    }
    finishRow(out, o, nt, method, constant);
  }
  if (waiting !== null && coarse !== null) {
    interpolateTwo(out, waiting.f * nt, waiting.acc, -1, null, nt, coarse.periods[waiting.f]);
    finishRow(out, waiting.f * nt, nt, method, 0);
  }
}

// baselineStats' mean alone (the same sum in the same order).
function baselineMean(row: Float32Array, off: number, first: number, last: number): number {
  let sum = 0;
  for (let j = first; j <= last; j++) sum += row[off + j];
  return sum / (last - first + 1);
}

// The same mean from block sums (see `TrialPower.blockSums`): the points before the first whole block, the whole
// blocks, the points after the last; equal to baselineMean up to rounding.
function blockMean(row: Float32Array, sums: Float64Array, r: number, nt: number, first: number, last: number): number {
  const blocks = Math.ceil(nt / BASELINE_BLOCK);
  const off = r * nt;
  const b0 = Math.ceil(first / BASELINE_BLOCK);
  const b1 = Math.floor((last + 1) / BASELINE_BLOCK);
  let sum = 0;
  if (b0 >= b1) {
    for (let j = first; j <= last; j++) sum += row[off + j];
  } else {
    for (let j = first; j < b0 * BASELINE_BLOCK; j++) sum += row[off + j];
    for (let b = b0; b < b1; b++) sum += sums[r * blocks + b];
    for (let j = b1 * BASELINE_BLOCK; j <= last; j++) sum += row[off + j];
  }
  return sum / (last - first + 1);
}

// The method's last step on a row of Σ_k w_k·P_k: percent change 100·(x − 1), z-score x + constant.
function finishRow(out: Float64Array, o: number, nt: number, method: BaselineMethod, constant: number): void {
  if (method === 'percent-change') {
    for (let j = 0; j < nt; j++) out[o + j] = 100 * (out[o + j] - 1);
  } else if (method === 'z-score') {
    for (let j = 0; j < nt; j++) out[o + j] += constant;
  }
}

const coarseScratch: { acc: Float64Array | null } = { acc: null };

// acc[s] = Σ_k w_k·p_k[s] at frequency f (S_f = s points), four trials per sweep; a scratch reused between calls.
function coarseSum(coarse: CoarseRows, block: number, K: number, f: number, s: number, weights: Float64Array): Float64Array {
  if (coarseScratch.acc === null || coarseScratch.acc.length !== s) coarseScratch.acc = new Float64Array(s);
  const acc = coarseScratch.acc;
  acc.fill(0);
  const p = coarse.samples;
  const start = coarse.offsets[f];
  let k = 0;
  for (; k + 4 <= K; k += 4) {
    const a = k * block + start;
    const b = a + block;
    const c = b + block;
    const d = c + block;
    const wa = weights[k];
    const wb = weights[k + 1];
    const wc = weights[k + 2];
    const wd = weights[k + 3];
    for (let q = 0; q < s; q++) acc[q] += wa * p[a + q] + wb * p[b + q] + wc * p[c + q] + wd * p[d + q];
  }
  for (; k < K; k++) {
    const a = k * block + start;
    const wa = weights[k];
    for (let q = 0; q < s; q++) acc[q] += wa * p[a + q];
  }
  return acc;
}

const interpolationScratch = new Map<number, { c: Float64Array; spectrum: Float64Array; p: Float64Array }>();

function scratchFor(n: number, s: number): { c: Float64Array; spectrum: Float64Array; p: Float64Array } {
  let k = interpolationScratch.get(n);
  if (k === undefined) {
    k = { c: new Float64Array(4 * s), spectrum: new Float64Array(2 * n), p: new Float64Array(2 * n) };
    interpolationScratch.set(n, k);
  }
  if (k.c.length < 4 * s) k.c = new Float64Array(4 * s);
  return k;
}

// Adds the interpolation spectrum of coarse samples acc (S = acc.length points per period n) into `spectrum`,
// times 1 (`imaginary` false) or times i: the coefficients `interpolatePower` (decompose.ts) fills, conj(c_d) with
// c_d = FFT_S(acc)[d]/S and the Nyquist coefficient split between ±S/2. `c` is scratch of 4S values.
function addInterpolationSpectrum(spectrum: Float64Array, acc: Float64Array, n: number, c: Float64Array, imaginary: boolean): void {
  const m2 = acc.length;
  const m = m2 / 2;
  const input = c.subarray(2 * m2, 4 * m2);
  input.fill(0);
  for (let s = 0; s < m2; s++) input[2 * s] = acc[s];
  const coefficients = c.subarray(0, 2 * m2);
  getFft(m2).transform(coefficients, input);
  const put = (bin: number, re: number, im: number) => {
    if (imaginary) {
      spectrum[2 * bin] -= im;
      spectrum[2 * bin + 1] += re;
    } else {
      spectrum[2 * bin] += re;
      spectrum[2 * bin + 1] += im;
    }
  };
  for (let d = 0; d < m; d++) put(d, coefficients[2 * d] / m2, -coefficients[2 * d + 1] / m2);
  for (let d = 1; d < m; d++) put(n - d, coefficients[2 * (m2 - d)] / m2, -coefficients[2 * (m2 - d) + 1] / m2);
  put(m, coefficients[2 * m] / (2 * m2), -coefficients[2 * m + 1] / (2 * m2));
  put(n - m, coefficients[2 * m] / (2 * m2), -coefficients[2 * m + 1] / (2 * m2));
}

/**
 * `interpolatePower` (decompose.ts) of two coarse rows `a` and `b` of the same period n in one transform: both
 * rows are real, so FFT_n(conj S_a + i·conj S_b) = p_a + i·p_b (two real signals in one complex FFT; the cross-talk
 * is the rounding of each row's imaginary part, ~1e-16 of it). The rows go to out[oa …] and out[ob …] (`b` null:
 * one row), `length` points each, clamped at 0 like `interpolatePower`.
 */
export function interpolateTwo(out: Float64Array, oa: number, a: Float64Array, ob: number, b: Float64Array | null, length: number, n: number): void {
  const k = scratchFor(n, Math.max(a.length, b === null ? 0 : b.length));
  k.spectrum.fill(0);
  addInterpolationSpectrum(k.spectrum, a, n, k.c, false);
  if (b !== null) addInterpolationSpectrum(k.spectrum, b, n, k.c, true);
  getFft(n).transform(k.p, k.spectrum);
  const p = k.p;
  for (let j = 0; j < length; j++) out[oa + j] = p[2 * j] > 0 ? p[2 * j] : 0;
  if (b !== null) for (let j = 0; j < length; j++) out[ob + j] = p[2 * j + 1] > 0 ? p[2 * j + 1] : 0;
}
