import { baselineStats, normalizeAverage, zScoreAcrossTrials, type BaselineMethod, type BaselineScope, type BaselineSpread } from './baseline';
import { AnalysisCancelledError } from './errors';
import type { PowerOfTwoFft } from './fft';
import { getFft } from './fft';
import { getWaveletBank } from './wavelet';
import { log10 } from './portable-math';
import { addRatio, baselineWeights, coarseBaseline, TrialGroups } from './trial-products';

// Epochs are transformed in blocks and then swept frequency by frequency, so one frequency's weights stay in
// cache across the block; the per-(frequency, time) sums still run in epoch order (trial scope's groups carry over
// from one block to the next).
const EPOCH_BLOCK = 16;

/** Everything one channel's time-frequency decomposition needs; plain data, so it can cross to a worker. */
export interface DecomposeJob {
  /** One channel's whole recording, µV. */
  samples: Float32Array;
  /** Per condition, the first sample of each kept epoch. */
  epochStarts: Int32Array[];
  /** L, samples per epoch (the contract's time grid length). */
  epochSamples: number;
  sampleRateHz: number;
  frequencies: Float64Array;
  /** Gaussian σ per frequency, seconds (see `gaussianSigmas`). */
  sigmas: Float64Array;
  /** `spread` (z-score only): S over the baseline's time points (default) or across trials (`zScoreAcrossTrials`). */
  baseline: { first: number; last: number; method: BaselineMethod; scope: BaselineScope; spread?: BaselineSpread };
  /** Keep every trial's power (only for the one channel the explorer shows trial by trial). */
  singleTrials?: boolean;
  /** With `singleTrials`: also each trial's coarse power samples (`CoarseTrials`), for live re-normalization. */
  coarseTrials?: boolean;
  /** Also sum each trial's unit phasor for inter-trial phase consistency (analysis contract, recipe `"itpc": true`). */
  itpc?: boolean;
  /** Induced power: subtract the condition's evoked response (mean of its demeaned epochs) from each epoch first. */
  induced?: boolean;
}

export interface DecomposeOutput {
  /** Per condition, trial-averaged power `[f·L + t]`, µV². */
  power: Float64Array[];
  /** Per condition, baseline-normalized power `[f·L + t]` in the recipe's method and scope. */
  normalized: Float64Array[];
  /** Per condition, `[(trial·F + f)·L + t]` power, µV², when the job asked for it. */
  singleTrials: Float32Array[] | null;
  /** Each trial's coarse power samples, when the job asked for `coarseTrials`. */
  coarseTrials: CoarseTrials | null;
  /** Per condition, inter-trial phase consistency `[f·L + t]`, 0 … 1, when the job asked for it. */
  itpc: Float64Array[] | null;
  /** Per condition, the evoked response (mean of the demeaned epochs, µV, length L), when the job asked for induced power. */
  evoked: Float64Array[] | null;
}

/**
 * Each trial's power on the trial-average path's coarse grid (see `averagePower`): at frequency f, S_f samples
 * p_k[s] = |y_k(s·N_f/S_f)|² fix the trial's whole power row exactly (a trigonometric polynomial of lags below
 * S_f/2), so a weighted sum over trials Σ_k w_k·P_k(t) is `interpolatePower` of Σ_k w_k·p_k[s]: S_f work per trial
 * instead of L (renormalize.ts uses it while the baseline moves).
 */
export interface CoarseTrials {
  /** S_f, coarse samples per trial at frequency f; 0 where the band is too wide for the coarse path. */
  points: Int32Array;
  /** N_f, the period (circular convolution length) the S_f samples span. */
  periods: Int32Array;
  /** Where frequency f starts in one trial's block; `offsets[F]` is the block's length. */
  offsets: Int32Array;
  /** Per condition, `[k·offsets[F] + offsets[f] + s]`, µV² (single precision, like the stored trial rows). */
  samples: Float32Array[];
}

export interface DecomposeOptions {
  onProgress?: (fraction: number) => void;
  shouldCancel?: () => boolean;
}

/**
 * Morlet wavelet power `|x ∗ w_f|²` (µV²) of every epoch of one channel, each epoch's own mean removed first,
 * accumulated into trial averages and, for scope `trial`, into averages of per-trial normalized power as each
 * trial is produced (analysis contract, "Epoch means", "Complex Morlet wavelet power" and "Baseline
 * normalization"). Per epoch: one real forward FFT; per frequency with a narrow band: one transform of size 2M on
 * a coarse time grid whose sum over trials is interpolated exactly once per condition (see `averagePower`); scope
 * `trial` (but z-score) normalizes from those same samples (see trial-products.ts). A trial's own row, where one is
 * needed (single trials, z-score in scope `trial`, wide bands), is the inverse of `X·W_f` over the wavelet's band
 * only, as `N_f/M_f` transforms of size `M_f` (see `WaveletBank`).
 * No trial × frequency × time array is kept (unless `singleTrials`): memory is bounded by frequencies × times per
 * condition. Sums run in Float64 in epoch order, so a channel gives the same bits wherever it runs.
 */
export function decomposeChannel(job: DecomposeJob, options: DecomposeOptions = {}): DecomposeOutput {
  const { samples, epochStarts, epochSamples: L, sampleRateHz, frequencies, sigmas, baseline } = job;
  const { onProgress, shouldCancel } = options;
  const nf = frequencies.length;
  const bank = getWaveletBank(frequencies, sigmas, sampleRateHz, L);
  const { first, last, method } = baseline;
  const fftSize = bank.fftSize;
  const forward = getFft(fftSize);
  const epoch = new Float64Array(fftSize);
  const spectra: Float64Array[] = [];
  for (let b = 0; b < EPOCH_BLOCK; b++) spectra.push(new Float64Array(2 * fftSize));
  let maxBand = 2;
  for (let f = 0; f < nf; f++) maxBand = Math.max(maxBand, bank.bandSizes[f], 2 * bank.averageBandSizes[f]);
  const band = new Float64Array(2 * maxBand);
  const work = new Float64Array(2 * maxBand);
  const out = new Float64Array(2 * maxBand);
  const row = new Float64Array(L);
  const spreadTrials = baseline.method === 'z-score' && baseline.spread === 'trials';
  // Across-trials z-scores normalize the trial average once (zScoreAcrossTrials), whatever the scope.
  const trialScope = baseline.scope === 'trial' && !spreadTrials;
  const keepRow = trialScope || job.singleTrials === true || spreadTrials;
  // Trial scope in decibels, percent change and power ratio also takes the coarse samples of the trial-average
  // path (trial-products.ts): B_k from them, then Σ_k P_k/B_k interpolated once, or in decibels one
  // full-resolution row per group of trials (TrialGroups). z-score needs each trial's S_k over its own row: the
  // per-trial path.
  const coarseTrials = trialScope && method !== 'z-score';
  // Frequencies with a narrow band take the trial-average path (see averagePower). Keeping single trials must not
  // change that choice: the average then has other rounding, and the explorer's channel would no longer match the
  // command line bit for bit. Those rows go through bandPower into a scratch sum.
  const averagePath = !trialScope || coarseTrials;
  const coarseOut: CoarseTrials | null = job.singleTrials === true && job.coarseTrials === true ? coarseLayout(bank.averageBandSizes, bank.sizes, averagePath) : null;
  const coarseBlock = coarseOut === null ? 0 : coarseOut.offsets[nf];
  const scratch = new Float64Array(L);
  // A trial's coarse samples, and in decibels the groups of trials whose product makes one full-resolution row
  // (trial scope, see trial-products.ts).
  let maxCoarse = 2;
  for (let f = 0; f < nf; f++) maxCoarse = Math.max(maxCoarse, 2 * bank.averageBandSizes[f]);
  const trialSamples = coarseTrials ? new Float64Array(2 * maxCoarse) : null;
  // One per frequency on the trial-average path, kept across epoch blocks (a group may span two).
  const groups: (TrialGroups | null)[] | null =
    coarseTrials && method === 'decibel'
      ? Array.from({ length: nf }, (_, f) => (bank.averageBandSizes[f] > 0 ? new TrialGroups(f, bank.sizes[f], 2 * bank.averageBandSizes[f]) : null))
      : null;

  let totalEpochs = 0;
  for (const starts of epochStarts) totalEpochs += starts.length;
  let doneEpochs = 0;
  let reported = 0;

  const power: Float64Array[] = [];
  const normalized: Float64Array[] = [];
  const singleTrials: Float32Array[] | null = job.singleTrials ? [] : null;
  const itpc: Float64Array[] | null = job.itpc === true ? [] : null;
  const evokedOut: Float64Array[] | null = job.induced === true ? [] : null;
  // With induced power the phases for phase consistency still come from the whole demeaned epoch (the contract's
  // y_k): by linearity its spectrum is the residual's plus the evoked response's, added back per epoch.
  const evokedSpectrum = evokedOut !== null && itpc !== null ? new Float64Array(2 * fftSize) : null;
  const totalSpectrum = evokedSpectrum !== null ? new Float64Array(2 * fftSize) : null;

  for (let c = 0; c < epochStarts.length; c++) {
    const starts = epochStarts[c];
    const trials = starts.length;
    const sum = new Float64Array(nf * L);
    const normSum = trialScope ? new Float64Array(nf * L) : null;
    // Trial scope in decibels: Σ_k 10·log10(P_k/B_k) = 10·log10 Π_k P_k − 10·Σ_k log10 B_k, the product kept as a
    // mantissa and a power of two per point (see LogProduct), so a point costs one logarithm per condition, not one
    // per trial.
    const logProduct = normSum !== null && method === 'decibel' ? new LogProduct(nf * L, nf) : null;
    const single = singleTrials !== null ? new Float32Array(trials * nf * L) : null;
    const coarse = coarseOut !== null ? new Float32Array(trials * coarseBlock) : null;
    // Σ_k y_k/|y_k| as interleaved (re, im) per (frequency, time); power's own sums are left untouched, so asking
    // for phase consistency never changes a power bit.
    const phasors = itpc !== null ? new Float64Array(2 * nf * L) : null;
    // Induced power (e.g. Tallon-Baudry & Bertrand, 1999, Trends Cogn Sci 3:151): the condition's evoked response,
    // the mean of its demeaned epochs summed in epoch order, is taken out of every epoch before the transform.
    const evoked = evokedOut !== null ? evokedResponse(samples, starts, L) : null;
    if (evoked !== null && evokedSpectrum !== null) {
      epoch.set(evoked);
      forward.realTransform(evokedSpectrum, epoch);
      forward.completeSpectrum(evokedSpectrum);
      epoch.fill(0);
    }
    // B_k(f), each trial's baseline mean, for across-trials z-scores.
    const trialBaselines = spreadTrials ? new Float64Array(trials * nf) : null;
    const decimated: (Float64Array | null)[] = [];
    for (let f = 0; f < nf; f++) decimated.push(averagePath && bank.averageBandSizes[f] > 0 ? new Float64Array(2 * bank.averageBandSizes[f]) : null);
    // Σ_k |u_k|²/B_k on the coarse grid (trial scope, percent change and power ratio).
    const ratios = coarseTrials && logProduct === null ? decimated.map((acc) => (acc === null ? null : new Float64Array(acc.length))) : null;
    if (groups !== null) {
      for (let f = 0; f < nf; f++) {
        const group = groups[f];
        if (group === null) continue;
        const s = 2 * bank.averageBandSizes[f];
        group.begin(bank.sizes[f], s, bank.bandWidths[f], bank.averageOffsets[f]);
        group.useBaseline(baselineWeights(bank.sizes[f], s, first, last));
      }
    }
    for (let e0 = 0; e0 < trials; e0 += EPOCH_BLOCK) {
      if (shouldCancel !== undefined && shouldCancel()) throw new AnalysisCancelledError();
      const nb = Math.min(EPOCH_BLOCK, trials - e0);
      for (let b = 0; b < nb; b++) {
        const s0 = starts[e0 + b];
        // Each epoch's own mean is removed before the transform (analysis contract, "Epoch means"): a Morlet
        // wavelet without a correction term passes about 2·exp(−n²/2) of a steady offset. The sum runs in Float64
        // in sample order, so the mean has the same bits in every engine.
        let total = 0;
        for (let j = 0; j < L; j++) total += samples[s0 + j];
        const mean = total / L;
        if (evoked === null) for (let j = 0; j < L; j++) epoch[j] = samples[s0 + j] - mean;
        else for (let j = 0; j < L; j++) epoch[j] = samples[s0 + j] - mean - evoked[j];
        forward.realTransform(spectra[b], epoch);
        forward.completeSpectrum(spectra[b]);
      }
      for (let f = 0; f < nf; f++) {
        if (phasors !== null) {
          for (let b = 0; b < nb; b++) {
            let spectrum = spectra[b];
            if (evokedSpectrum !== null && totalSpectrum !== null) {
              for (let i = 0; i < spectrum.length; i++) totalSpectrum[i] = spectrum[i] + evokedSpectrum[i];
              spectrum = totalSpectrum;
            }
            bandPhase(phasors, 2 * f * L, L, spectrum, bank.bins[f], bank.weights[f], bank.sizes[f] / bank.bandSizes[f], band, work, out);
          }
        }
        const acc = decimated[f];
        if (acc !== null) {
          const bins = bank.averageBins[f] as Int32Array;
          const weights = bank.averageWeights[f] as Float64Array;
          if (trialSamples === null) {
            for (let b = 0; b < nb; b++) {
              averagePower(acc, spectra[b], bins, weights, work, out);
              if (coarse !== null && coarseOut !== null) keepCoarse(coarse, (e0 + b) * coarseBlock + coarseOut.offsets[f], out, acc.length);
            }
          } else {
            // Trial scope: the same power sums, and each trial's samples for its own normalization.
            const a = baselineWeights(bank.sizes[f], acc.length, first, last);
            const ratio = ratios !== null ? ratios[f] : null;
            const group = groups !== null ? groups[f] : null;
            for (let b = 0; b < nb; b++) {
              averagePower(acc, spectra[b], bins, weights, work, trialSamples);
              if (coarse !== null && coarseOut !== null) keepCoarse(coarse, (e0 + b) * coarseBlock + coarseOut.offsets[f], trialSamples, acc.length);
              if (ratio !== null) addRatio(ratio, trialSamples, coarseBaseline(trialSamples, a));
              else if (logProduct !== null && group !== null) {
                logProduct.addBaseline(f, group.add(trialSamples));
                if (group.full()) group.rows(row, L, (r, shift) => logProduct.multiplyScaledRow(f, r, L, shift));
              }
            }
          }
          if (single !== null || trialBaselines !== null) {
            for (let b = 0; b < nb; b++) {
              bandPower(scratch, 0, row, L, spectra[b], bank.bins[f], bank.weights[f], bank.sizes[f] / bank.bandSizes[f], band, work, out);
              if (single !== null) single.set(row, ((e0 + b) * nf + f) * L);
              if (trialBaselines !== null) trialBaselines[(e0 + b) * nf + f] = baselineStats(row, 0, first, last).mean;
            }
          }
          continue;
        }
        const off = f * L;
        const bins = bank.bins[f];
        const weights = bank.weights[f];
        const residues = bank.sizes[f] / bank.bandSizes[f];
        for (let b = 0; b < nb; b++) {
          bandPower(sum, off, keepRow ? row : null, L, spectra[b], bins, weights, residues, band, work, out);
          if (logProduct !== null) logProduct.multiply(off, row, L, f, baselineStats(row, 0, first, last).mean);
          else if (normSum !== null) accumulateNormalized(normSum, off, row, L, method, first, last);
          if (single !== null) single.set(row, ((e0 + b) * nf + f) * L);
          if (trialBaselines !== null) trialBaselines[(e0 + b) * nf + f] = baselineStats(row, 0, first, last).mean;
        }
      }
      doneEpochs += nb;
      if (onProgress !== undefined && (doneEpochs === totalEpochs || doneEpochs / totalEpochs - reported >= 0.05)) {
        reported = doneEpochs / totalEpochs;
        onProgress(reported);
      }
    }
    // The last group of each frequency, however many trials it holds.
    if (groups !== null && logProduct !== null) {
      for (let f = 0; f < nf; f++) {
        const group = groups[f];
        if (group === null || group.pending === 0) continue;
        group.rows(row, L, (r, shift) => logProduct.multiplyScaledRow(f, r, L, shift));
      }
    }
    for (let f = 0; f < nf; f++) {
      const acc = decimated[f];
      if (acc !== null) interpolatePower(sum, f * L, L, acc, bank.sizes[f]);
      const ratio = ratios !== null ? ratios[f] : null;
      if (ratio !== null && normSum !== null) {
        // Σ_k P_k/B_k at every time point; percent change sums 100·(P_k/B_k − 1).
        interpolatePower(scratch, 0, L, ratio, bank.sizes[f]);
        const off = f * L;
        if (method === 'percent-change') for (let j = 0; j < L; j++) normSum[off + j] = 100 * (scratch[j] - trials);
        else for (let j = 0; j < L; j++) normSum[off + j] = scratch[j];
      }
    }
    for (let i = 0; i < sum.length; i++) sum[i] /= trials;
    power.push(sum);
    if (trialBaselines !== null) {
      normalized.push(zScoreAcrossTrials(sum, L, trialBaselines, trials));
    } else if (normSum !== null) {
      if (logProduct !== null) logProduct.decibelsInto(normSum, L);
      for (let i = 0; i < normSum.length; i++) normSum[i] /= trials;
      normalized.push(normSum);
    } else {
      normalized.push(normalizeAverage(sum, L, baseline, method));
    }
    if (singleTrials !== null && single !== null) singleTrials.push(single);
    if (coarseOut !== null && coarse !== null) coarseOut.samples.push(coarse);
    if (itpc !== null && phasors !== null) itpc.push(phaseConsistency(phasors, nf * L, trials));
    if (evokedOut !== null && evoked !== null) evokedOut.push(evoked);
  }
  if (onProgress !== undefined && totalEpochs === 0) onProgress(1);
  return { power, normalized, singleTrials, coarseTrials: coarseOut, itpc, evoked: evokedOut };
}

// The coarse layout: S_f = 2·M_f where frequency f takes the trial-average path, else 0.
function coarseLayout(bandSizes: Int32Array, periods: Int32Array, averagePath: boolean): CoarseTrials {
  const nf = bandSizes.length;
  const points = new Int32Array(nf);
  const offsets = new Int32Array(nf + 1);
  for (let f = 0; f < nf; f++) {
    points[f] = averagePath ? 2 * bandSizes[f] : 0;
    offsets[f + 1] = offsets[f] + points[f];
  }
  return { points, periods: Int32Array.from(periods), offsets, samples: [] };
}

// p[s] = |u[s]|², u interleaved complex (the same squares averagePower adds to its sum).
function keepCoarse(into: Float32Array, off: number, u: Float64Array, count: number): void {
  for (let s = 0; s < count; s++) into[off + s] = u[2 * s] * u[2 * s] + u[2 * s + 1] * u[2 * s + 1];
}

// Mean over a condition's epochs of each epoch with its own mean removed, µV, summed in Float64 in epoch order.
function evokedResponse(samples: Float32Array, starts: Int32Array, length: number): Float64Array {
  const sum = new Float64Array(length);
  for (let e = 0; e < starts.length; e++) {
    const s0 = starts[e];
    let total = 0;
    for (let j = 0; j < length; j++) total += samples[s0 + j];
    const mean = total / length;
    for (let j = 0; j < length; j++) sum[j] += samples[s0 + j] - mean;
  }
  if (starts.length > 0) for (let j = 0; j < length; j++) sum[j] /= starts.length;
  return sum;
}

// |Σ_k y_k/|y_k|| / N per (frequency, time) from the interleaved phasor sums (analysis contract, "Inter-trial phase
// consistency"; the phase-locking value of Tallon-Baudry et al., 1996, J Neurosci 16:4240, and Lachaux et al., 1999,
// Hum Brain Mapp 8:194). A trial with |y| = 0 adds nothing, so a point where every |y_k| is 0 reads 0.
function phaseConsistency(phasors: Float64Array, points: number, trials: number): Float64Array {
  const out = new Float64Array(points);
  if (trials === 0) return out;
  for (let i = 0; i < points; i++) {
    const re = phasors[2 * i];
    const im = phasors[2 * i + 1];
    out[i] = Math.sqrt(re * re + im * im) / trials;
  }
  return out;
}

// conj(X) over the wavelet's band, interleaved (re, im), for the per-residue transforms below.
function gatherConjugate(band: Float64Array, spectrum: Float64Array, bins: Int32Array): void {
  for (let q = 0; q < bins.length; q++) {
    const idx = bins[q];
    band[2 * q] = spectrum[idx];
    band[2 * q + 1] = -spectrum[idx + 1];
  }
}

// For output residue r, one size-M transform of conj(X)·V_r into out: y[q·R + r] up to a factor of modulus 1.
function residueTransform(out: Float64Array, band: Float64Array, weights: Float64Array, r: number, m: number, work: Float64Array, fft: PowerOfTwoFft): void {
  const base = 2 * r * m;
  for (let q = 0; q < m; q++) {
    const xr = band[2 * q];
    const xi = band[2 * q + 1];
    const vr = weights[base + 2 * q];
    const vi = weights[base + 2 * q + 1];
    work[2 * q] = xr * vr - xi * vi;
    work[2 * q + 1] = xr * vi + xi * vr;
  }
  fft.transform(out, work);
}

// The same transforms as bandPower, keeping the phase: out holds conj(y) times a factor of modulus 1 that depends
// on the time point and the wavelet's band only, never on the trial, so |Σ_k out_k/|out_k|| = |Σ_k y_k/|y_k||.
function bandPhase(
  phasors: Float64Array,
  off: number,
  length: number,
  spectrum: Float64Array,
  bins: Int32Array,
  weights: Float64Array,
  residues: number,
  band: Float64Array,
  work: Float64Array,
  out: Float64Array,
): void {
  const m = bins.length;
  const fft = getFft(m);
  gatherConjugate(band, spectrum, bins);
  for (let r = 0; r < residues; r++) {
    residueTransform(out, band, weights, r, m, work, fft);
    const count = Math.min(m, Math.ceil((length - r) / residues));
    for (let q = 0, j = r; q < count; q++, j += residues) {
      const re = out[2 * q];
      const im = out[2 * q + 1];
      const mag = Math.sqrt(re * re + im * im);
      if (mag > 0) {
        phasors[off + 2 * j] += re / mag;
        phasors[off + 2 * j + 1] += im / mag;
      }
    }
  }
}

// Power of one epoch at one frequency (see WaveletBank): gather conj(X) over the band, then for each output
// residue r one size-M transform of conj(X)·V_r gives y[q·R + r] up to a phase; add |y|² into sum, and into row
// when the caller needs the trial's own power.
function bandPower(
  sum: Float64Array,
  off: number,
  row: Float64Array | null,
  length: number,
  spectrum: Float64Array,
  bins: Int32Array,
  weights: Float64Array,
  residues: number,
  band: Float64Array,
  work: Float64Array,
  out: Float64Array,
): void {
  const m = bins.length;
  const fft = getFft(m);
  gatherConjugate(band, spectrum, bins);
  for (let r = 0; r < residues; r++) {
    residueTransform(out, band, weights, r, m, work, fft);
    const count = Math.min(m, Math.ceil((length - r) / residues));
    if (row === null) {
      for (let q = 0, j = off + r; q < count; q++, j += residues) {
        const re = out[2 * q];
        const im = out[2 * q + 1];
        sum[j] += re * re + im * im;
      }
    } else {
      for (let q = 0, j = r; q < count; q++, j += residues) {
        const re = out[2 * q];
        const im = out[2 * q + 1];
        const p = re * re + im * im;
        row[j] = p;
        sum[off + j] += p;
      }
    }
  }
}

// Trial-average path. Power is |y|², and y's spectrum lies in M bins, so |y|² is a trigonometric polynomial with
// lags below M: 2M samples per period N fix it exactly. Per epoch, u = FFT_2M(conj(X)·conj(W)/N over the band,
// zero-padded) gives |y| at j = s·N/(2M) (the same identity as bandPower with a coarser grid); |u|² is summed over
// trials, and interpolatePower turns the 2M summed samples into all L time points once per condition.
function averagePower(acc: Float64Array, spectrum: Float64Array, bins: Int32Array, weights: Float64Array, work: Float64Array, out: Float64Array): void {
  const m = bins.length;
  const m2 = 2 * m;
  for (let q = 0; q < m; q++) {
    const idx = bins[q];
    const xr = spectrum[idx];
    const xi = -spectrum[idx + 1];
    const vr = weights[2 * q];
    const vi = weights[2 * q + 1];
    work[2 * q] = xr * vr - xi * vi;
    work[2 * q + 1] = xr * vi + xi * vr;
  }
  work.fill(0, 2 * m, 2 * m2);
  getFft(m2).transform(out, work);
  for (let s = 0; s < m2; s++) {
    const re = out[2 * s];
    const im = out[2 * s + 1];
    acc[s] += re * re + im * im;
  }
}

// Exact band-limited (Fourier) interpolation of 2M samples acc[s] = p(s·N/(2M)) of a power row p with lags below
// M, written to sum[off + j] for j < L: c_d = FFT_2M(acc)[d]/(2M), p(j) = Σ_d c_d·exp(2πi d j/N). The Nyquist
// coefficient (zero up to rounding) is split between ±M as usual; rounding below zero is clamped to 0.
export function interpolatePower(sum: Float64Array, off: number, length: number, acc: Float64Array, n: number): void {
  const m2 = acc.length;
  const m = m2 / 2;
  const input = new Float64Array(2 * m2);
  for (let s = 0; s < m2; s++) input[2 * s] = acc[s];
  const c = new Float64Array(2 * m2);
  getFft(m2).transform(c, input);
  // p(j) = Re Σ_k S[k]·exp(+2πi k j/N) = Re FFT_N(conj S)[j]; conj S is filled directly.
  const spectrum = new Float64Array(2 * n);
  for (let d = 0; d < m; d++) {
    spectrum[2 * d] = c[2 * d] / m2;
    spectrum[2 * d + 1] = -c[2 * d + 1] / m2;
  }
  for (let d = 1; d < m; d++) {
    spectrum[2 * (n - d)] = c[2 * (m2 - d)] / m2;
    spectrum[2 * (n - d) + 1] = -c[2 * (m2 - d) + 1] / m2;
  }
  spectrum[2 * m] += c[2 * m] / (2 * m2);
  spectrum[2 * m + 1] -= c[2 * m + 1] / (2 * m2);
  spectrum[2 * (n - m)] += c[2 * m] / (2 * m2);
  spectrum[2 * (n - m) + 1] -= c[2 * m + 1] / (2 * m2);
  const p = new Float64Array(2 * n);
  getFft(n).transform(p, spectrum);
  for (let j = 0; j < length; j++) sum[off + j] = p[2 * j] > 0 ? p[2 * j] : 0;
}

const LOG10_2 = log10(2);
const TWO_POW_64 = 18446744073709551616; // 2^64, exact
// 2^−500 and 2^500 by exact doublings: LogProduct's mantissas stay inside, far from overflow and subnormals.
const PRODUCT_HIGH = twoToThe(500);
const PRODUCT_LOW = 1 / PRODUCT_HIGH;

function twoToThe(k: number): number {
  let x = 1;
  for (let i = 0; i < k; i++) x *= 2;
  return x;
}

/**
 * Σ_k log10 x_k per point without a logarithm per term: the product Π_k x_k is kept as m·2^e (the IEEE 754
 * binary64 layout: the exponent field is bits 52–62, bias 1023), m brought back to [1, 2) whenever it leaves
 * [2^−500, 2^500], so it can neither overflow nor underflow; log10 Π = log10 m + e·log10 2 is taken once at the
 * end. Zero, infinite and NaN terms propagate as they would through the sum of logarithms (−∞, +∞, NaN). The product's relative rounding
 * error grows by at most 2^−53 per term (each multiply is correctly rounded), far below a logarithm's own rounding.
 */
class LogProduct {
  private readonly mantissa: Float64Array;
  private readonly words: Uint32Array;
  private readonly exponent: Float64Array;
  /** Σ_k log10 B_k per frequency. */
  private readonly logBaselines: Float64Array;
  /** Per frequency, a power of two every row was scaled down by (an integer, see `addExponent`). */
  private readonly shifts: Float64Array;

  constructor(points: number, frequencies: number) {
    this.mantissa = new Float64Array(points).fill(1);
    this.words = new Uint32Array(this.mantissa.buffer);
    this.exponent = new Float64Array(points);
    this.logBaselines = new Float64Array(frequencies);
    this.shifts = new Float64Array(frequencies);
  }

  /** A row at frequency f was Π P_k·2^−shift: the exponent gets shift back (integers, so exactly). */
  addExponent(f: number, shift: number): void {
    this.shifts[f] += shift;
  }

  /** Π_k P_k(t) *= row[t]·2^shift at frequency f (a row from TrialGroups.rows). */
  multiplyScaledRow(f: number, row: Float64Array, length: number, shift: number): void {
    this.addExponent(f, shift);
    this.multiplyRow(f * length, row, length);
  }

  multiply(off: number, row: Float64Array, length: number, f: number, baselineMean: number): void {
    this.addBaseline(f, baselineMean);
    this.multiplyRow(off, row, length);
  }

  /** One trial's B_k at frequency f. */
  addBaseline(f: number, baselineMean: number): void {
    this.logBaselines[f] += log10(baselineMean);
  }

  /**
   * Π_k P_k(t) *= row[t] (a row may be one trial's power or a product of several, see trial-products.ts). The
   * mantissa is renormalized only when a product leaves [2^−500, 2^500]: scaling by a power of two is exact in the
   * normal range, so the bits are those of renormalizing after every multiply.
   */
  multiplyRow(off: number, row: Float64Array, length: number): void {
    const m = this.mantissa;
    for (let j = 0; j < length; j++) {
      const i = off + j;
      const x = m[i] * row[j];
      if (x >= PRODUCT_LOW && x <= PRODUCT_HIGH) m[i] = x;
      else this.multiplyNormalized(i, row[j]);
    }
  }

  // m[i] scaled into [1, 2) (zero, infinity and NaN kept), then one multiply renormalized at once.
  private multiplyNormalized(i: number, term: number): void {
    this.normalize(i);
    const w = this.words;
    let x = this.mantissa[i] * term;
    let shift = 0;
    // A subnormal product (or a subnormal term) is scaled into the normal range first.
    if (x !== 0 && Math.abs(x) < 2.2250738585072014e-308) {
      x *= TWO_POW_64;
      shift = -64;
    }
    this.mantissa[i] = x;
    const hi = w[2 * i + 1];
    const field = (hi >>> 20) & 0x7ff;
    if (field === 0 || field === 0x7ff) return; // zero, infinity or NaN: kept as they are
    w[2 * i + 1] = (hi & 0x800fffff) | (1023 << 20);
    this.exponent[i] += field - 1023 + shift;
  }

  private normalize(i: number): void {
    const w = this.words;
    const hi = w[2 * i + 1];
    const field = (hi >>> 20) & 0x7ff;
    if (field === 0 || field === 0x7ff) return;
    w[2 * i + 1] = (hi & 0x800fffff) | (1023 << 20);
    this.exponent[i] += field - 1023;
  }

  /** 10·(log10 Π_k P_k − Σ_k log10 B_k) into `out[f·length + t]`. */
  decibelsInto(out: Float64Array, length: number): void {
    const m = this.mantissa;
    const e = this.exponent;
    for (let f = 0, off = 0; off < out.length; f++, off += length) {
      const logB = this.logBaselines[f];
      const shift = this.shifts[f];
      for (let i = off; i < off + length; i++) {
        this.normalize(i);
        out[i] = 10 * (log10(m[i]) + (e[i] + shift) * LOG10_2 - logB);
      }
    }
  }
}

// Little-endian layout is assumed by LogProduct's word view (every engine the product runs on is little-endian).
if (new Uint8Array(new Float64Array([1]).buffer)[7] !== 0x3f) throw new Error('decompose: a big-endian engine is not supported');

// One trial's row, normalized by its own baseline and added into the running sum; the method switch sits outside
// the loop so the loop body stays monomorphic.
function accumulateNormalized(
  sum: Float64Array,
  off: number,
  row: Float64Array,
  length: number,
  method: BaselineMethod,
  first: number,
  last: number,
): void {
  const { mean, sd } = baselineStats(row, 0, first, last);
  switch (method) {
    case 'decibel': {
      for (let j = 0; j < length; j++) sum[off + j] += 10 * log10(row[j] / mean);
      break;
    }
    case 'percent-change': {
      for (let j = 0; j < length; j++) sum[off + j] += (100 * (row[j] - mean)) / mean;
      break;
    }
    case 'z-score': {
      for (let j = 0; j < length; j++) sum[off + j] += (row[j] - mean) / sd;
      break;
    }
    case 'power-ratio': {
      for (let j = 0; j < length; j++) sum[off + j] += row[j] / mean;
      break;
    }
  }
}
