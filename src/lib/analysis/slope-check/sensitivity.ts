import { AnalysisCancelledError, AnalysisInputError } from '../errors';
import { fitAperiodic, type AperiodicFit, type AperiodicModel } from '../aperiodic';
import { log } from '../portable-math';
import { mulberry32 } from '../random';
import { welchSegments } from '../welch';

/**
 * The exponent over a grid of fit ranges: `[i·ends + j]` is the fit over `[starts[i], ends[j]]` Hz, NaN where the
 * range is empty or holds too few bins for the model. One spectrum, many fits: how much the estimate depends on where
 * the range begins and ends.
 */
export function exponentOverRanges(frequencies: ArrayLike<number>, psd: ArrayLike<number>, starts: number[], ends: number[], model: AperiodicModel, robust = true): Float64Array {
  const out = new Float64Array(starts.length * ends.length).fill(NaN);
  starts.forEach((lo, i) => {
    ends.forEach((hi, j) => {
      if (!(lo > 0 && lo < hi)) return;
      try {
        out[i * ends.length + j] = fitAperiodic(frequencies, psd, [lo, hi], model, { robust }).exponent;
      } catch (e) {
        if (!(e instanceof AnalysisInputError)) throw e;
      }
    });
  });
  return out;
}

export interface BootstrapInterval {
  /** The fit on all segments (what the Spectrum screen shows). */
  estimate: number;
  lower: number;
  upper: number;
  level: number;
  /** Exponent of each resample, in resample order. */
  resamples: Float64Array;
  segments: number;
}

export interface BootstrapOptions {
  repetitions?: number;
  /** Two-sided coverage, e.g. 0.9. */
  level?: number;
  seed?: number;
  robust?: boolean;
  shouldCancel?: () => boolean;
}

/**
 * Percentile bootstrap interval of the exponent over Welch segments (Efron & Tibshirani, 1993, An Introduction to the
 * Bootstrap, ch. 13): draw as many segments as there are, with replacement (seeded), average their periodograms,
 * fit; the interval is the (1 − level)/2 and (1 + level)/2 quantiles of the resampled exponents (linear
 * interpolation between order statistics). Neighbouring segments overlap, so the interval is somewhat narrow when
 * the overlap is large (say so where it is shown).
 */
export function bootstrapExponent(
  samples: ArrayLike<number>,
  sampleRateHz: number,
  segmentSamples: number,
  overlapSamples: number,
  spans: ArrayLike<number>,
  range: [number, number],
  model: AperiodicModel,
  options: BootstrapOptions = {},
): BootstrapInterval {
  const repetitions = options.repetitions ?? 500;
  const level = options.level ?? 0.9;
  if (!(level > 0 && level < 1)) throw new AnalysisInputError('level', `must lie between 0 and 1 (got ${level})`);
  if (!(Number.isInteger(repetitions) && repetitions >= 20)) throw new AnalysisInputError('repetitions', `must be a whole number ≥ 20 (got ${repetitions})`);
  const w = welchSegments(samples, sampleRateHz, segmentSamples, overlapSamples, spans);
  if (w.segments < 2) throw new AnalysisInputError('spectrum.segment', `leaves ${w.segments} Welch segment${w.segments === 1 ? '' : 's'}; a bootstrap over segments needs at least 2`);
  const bins = w.frequencies.length;
  const average = (pick: (i: number) => number): Float64Array => {
    const psd = new Float64Array(bins);
    for (let i = 0; i < w.segments; i++) {
      const row = pick(i) * bins;
      for (let k = 0; k < bins; k++) psd[k] += w.powers[row + k];
    }
    for (let k = 0; k < bins; k++) psd[k] = (w.scale[k] * psd[k]) / w.segments;
    return psd;
  };
  const robust = options.robust ?? true;
  const estimate = fitAperiodic(w.frequencies, average((i) => i), range, model, { robust }).exponent;
  const random = mulberry32(options.seed ?? 1);
  const resamples = new Float64Array(repetitions);
  for (let r = 0; r < repetitions; r++) {
    if (options.shouldCancel?.()) throw new AnalysisCancelledError();
    resamples[r] = fitAperiodic(w.frequencies, average(() => Math.floor(random() * w.segments)), range, model, { robust }).exponent;
  }
  const sorted = Float64Array.from(resamples).sort();
  return { estimate, lower: quantile(sorted, (1 - level) / 2), upper: quantile(sorted, (1 + level) / 2), level, resamples, segments: w.segments };
}

// Quantile p of sorted values, linear between order statistics at (n − 1)·p (Hyndman & Fan, 1996, Am Stat 50:361, type 7).
function quantile(sorted: Float64Array, p: number): number {
  const h = (sorted.length - 1) * p;
  const lo = Math.floor(h);
  const hi = Math.min(sorted.length - 1, lo + 1);
  return sorted[lo] + (h - lo) * (sorted[hi] - sorted[lo]);
}

export interface ModelComparison {
  powerLaw: AperiodicFit;
  /** Null when the knee model could not be fitted, with the reason. */
  knee: AperiodicFit | null;
  kneeFailure: string | null;
  /** Bayesian information criterion of each fit over all bins of the range; lower is better. */
  bicPowerLaw: number;
  bicKnee: number | null;
  /** BIC(power law) − BIC(knee): positive favours the knee. */
  deltaBic: number | null;
  preferred: AperiodicModel;
  /** One plain sentence: which model and why. */
  reason: string;
}

/**
 * Power law against power law with a knee on one spectrum, by the Bayesian information criterion computed from the
 * residual sum of squares of each fit in log10 power over the same n bins, `BIC = n·ln(RSS/n) + k·ln(n)` with k = 2 or
 * 3 parameters (Schwarz, 1978, Ann Stat 6:461; Gaussian residuals, the shared variance term cancels). The knee is
 * preferred only when BIC drops by more than 6 ("strong" evidence on the scale of Kass & Raftery, 1995, JASA 90:773).
 */
export function compareAperiodicModels(frequencies: ArrayLike<number>, psd: ArrayLike<number>, range: [number, number]): ModelComparison {
  const powerLaw = fitAperiodic(frequencies, psd, range, 'power-law');
  const bic = (fit: AperiodicFit, k: number) => fit.points * log(Math.max(fit.rmse * fit.rmse, Number.MIN_VALUE)) + k * log(fit.points);
  const bicPowerLaw = bic(powerLaw, 2);
  let knee: AperiodicFit | null = null;
  let kneeFailure: string | null = null;
  try {
    knee = fitAperiodic(frequencies, psd, range, 'power-law-knee');
    if (!Number.isFinite(knee.exponent) || !(knee.knee !== null && knee.knee >= 0)) {
      kneeFailure = `the knee fit did not settle on a usable knee (k = ${knee.knee})`;
      knee = null;
    }
  } catch (e) {
    kneeFailure = e instanceof Error ? e.message : String(e);
  }
  const bicKnee = knee !== null ? bic(knee, 3) : null;
  const deltaBic = bicKnee !== null ? bicPowerLaw - bicKnee : null;
  const preferKnee = deltaBic !== null && deltaBic > 6 && knee!.kneeHz !== null && knee!.kneeHz >= range[0] && knee!.kneeHz <= range[1];
  const d = deltaBic === null ? '' : deltaBic.toFixed(1);
  const reason =
    knee === null
      ? `Power law: the knee model could not be fitted on this range (${kneeFailure}).`
      : preferKnee
        ? `Power law with a knee: it lowers BIC by ${d} (more than 6 counts as strong evidence), with the bend at ${knee.kneeHz!.toFixed(1)} Hz inside the range.`
        : deltaBic! > 6
          ? `Power law: the knee model fits better by BIC (${d}) but puts the bend outside ${range[0]}–${range[1]} Hz, so the range holds no knee to estimate.`
          : `Power law: the knee model does not lower BIC by more than 6 (ΔBIC = ${d}); the extra parameter is not supported by this spectrum.`;
  return { powerLaw, knee, kneeFailure, bicPowerLaw, bicKnee, deltaBic, preferred: preferKnee ? 'power-law-knee' : 'power-law', reason };
}
