import { AnalysisCancelledError, AnalysisInputError } from '../errors';
import { roundHalfUp } from '../rounding';
import { runSlopeBench, type BenchOptions, type FitSetting } from './bench';
import { bootstrapExponent } from './sensitivity';
import { simulateAperiodic, type SimulationSettings } from './simulate';

/** What the Slope check screen's bench asks for: one truth, swept over true exponents, estimated by every setting. */
export interface SlopeSweepInput {
  /** Everything but the exponent, which `exponents` sweeps. */
  truth: Omit<SimulationSettings, 'exponent'>;
  exponents: number[];
  settings: FitSetting[];
  repetitions: number;
  /** Percentile bootstrap interval per repetition and setting (slow): how often it holds the true exponent. */
  coverage: { level: number; resamples: number } | null;
}

/** One setting at one true exponent: the bench's figures, the mean estimate and, when asked, the coverage. */
export interface SlopeSweepCell {
  setting: string;
  trueExponent: number;
  meanEstimate: number;
  bias: number;
  spread: number;
  rmse: number;
  failed: number;
  firstFailure: string | null;
  /** Share of the repetitions whose interval held the true exponent (over those where the bootstrap ran); null when not asked. */
  coverage: number | null;
  estimates: Float64Array;
}

export const SWEEP_LIMITS = { exponents: 8, settings: 6, repetitions: 500 } as const;

/**
 * The bench over several true exponents: `runSlopeBench` at each (seeds `truth.seed + r`, so every exponent and every
 * setting sees the same random draws), cells in exponent order, settings in their order inside. With `coverage`, each
 * repetition's series is drawn again from its seed (the same series) and `bootstrapExponent` is run over its Welch
 * segments with the setting's range, model and robustness; coverage is the share of intervals holding the truth
 * (for a 90 % interval, near 0.9 when the interval is well calibrated; Efron & Tibshirani, 1993, ch. 13).
 */
export function runSlopeSweep(input: SlopeSweepInput, options: BenchOptions = {}): SlopeSweepCell[] {
  const { exponents, settings, repetitions, coverage } = input;
  if (exponents.length < 1 || exponents.length > SWEEP_LIMITS.exponents) throw new AnalysisInputError('exponents', `must list 1 to ${SWEEP_LIMITS.exponents} true exponents (got ${exponents.length})`);
  if (settings.length < 1 || settings.length > SWEEP_LIMITS.settings) throw new AnalysisInputError('settings', `must hold 1 to ${SWEEP_LIMITS.settings} fit settings (got ${settings.length})`);
  if (!(Number.isInteger(repetitions) && repetitions >= 2 && repetitions <= SWEEP_LIMITS.repetitions)) {
    throw new AnalysisInputError('repetitions', `must be a whole number from 2 to ${SWEEP_LIMITS.repetitions} (got ${repetitions})`);
  }
  settings.forEach((s, i) => {
    if (!(s.range[0] > 0 && s.range[0] < s.range[1])) throw new AnalysisInputError(`settings[${i}].range`, `must run from a positive frequency up to a higher one (got ${s.range[0]}–${s.range[1]} Hz)`);
    if (s.range[1] > input.truth.sampleRateHz / 2) throw new AnalysisInputError(`settings[${i}].range`, `ends at ${s.range[1]} Hz, above Nyquist (${input.truth.sampleRateHz / 2} Hz)`);
    if (!(s.segmentSeconds > 0 && s.segmentSeconds <= input.truth.durationSeconds)) {
      throw new AnalysisInputError(`settings[${i}].segmentSeconds`, `must be positive and at most the duration (${input.truth.durationSeconds} s; got ${s.segmentSeconds})`);
    }
    if (!(s.overlap >= 0 && s.overlap < 1)) throw new AnalysisInputError(`settings[${i}].overlap`, `must lie in 0 … < 1 (got ${s.overlap})`);
  });
  const steps = exponents.length * (coverage === null ? 1 : 2);
  const out: SlopeSweepCell[] = [];
  exponents.forEach((exponent, e) => {
    const truth: SimulationSettings = { ...input.truth, exponent };
    const base = (e * (coverage === null ? 1 : 2)) / steps;
    const bench = runSlopeBench(truth, settings, repetitions, {
      shouldCancel: options.shouldCancel,
      onProgress: (f) => options.onProgress?.(base + f / steps),
    });
    const covered = coverage === null ? null : coverageOf(truth, settings, repetitions, coverage, options, base + 1 / steps, steps);
    bench.forEach((b, i) => out.push({ setting: b.name, trueExponent: exponent, meanEstimate: b.bias + exponent, bias: b.bias, spread: b.spread, rmse: b.rmse, failed: b.failed, firstFailure: b.firstFailure, coverage: covered === null ? null : covered[i], estimates: b.estimates }));
  });
  return out;
}

function coverageOf(truth: SimulationSettings, settings: FitSetting[], repetitions: number, c: { level: number; resamples: number }, options: BenchOptions, base: number, steps: number): number[] {
  const fs = truth.sampleRateHz;
  const held = settings.map(() => ({ yes: 0, ran: 0 }));
  for (let r = 0; r < repetitions; r++) {
    if (options.shouldCancel?.()) throw new AnalysisCancelledError();
    const x = simulateAperiodic({ ...truth, seed: truth.seed + r });
    settings.forEach((s, i) => {
      const n = roundHalfUp(s.segmentSeconds * fs);
      try {
        const ci = bootstrapExponent(x, fs, n, roundHalfUp(s.overlap * n), [0, x.length], s.range, s.model, { repetitions: c.resamples, level: c.level, seed: r + 1, robust: s.robust });
        held[i].ran++;
        if (ci.lower <= truth.exponent && truth.exponent <= ci.upper) held[i].yes++;
      } catch {
        // A resample the fit cannot take (too few bins): counted as not run, as the bench counts a failed fit.
      }
    });
    options.onProgress?.(base + (r + 1) / repetitions / steps);
  }
  return held.map((h) => (h.ran > 0 ? h.yes / h.ran : NaN));
}
