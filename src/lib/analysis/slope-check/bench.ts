import { AnalysisCancelledError } from '../errors';
import { fitAperiodic, type AperiodicModel } from '../aperiodic';
import { roundHalfUp } from '../rounding';
import { welchPsd } from '../welch';
import { simulateAperiodic, type SimulationSettings } from './simulate';

/** One way of estimating the exponent, as the product's fit runs it. */
export interface FitSetting {
  /** Shown beside the curve. */
  name: string;
  range: [number, number];
  model: AperiodicModel;
  /** Peaks left out (the product's default) or the plain single fit. */
  robust: boolean;
  segmentSeconds: number;
  /** Fraction 0 … < 1. */
  overlap: number;
}

export interface BenchSetting {
  name: string;
  /** Exponent estimated in each repetition, in repetition order (NaN where the fit could not run). */
  estimates: Float64Array;
  /** mean(estimate) − true exponent. */
  bias: number;
  /** Sample standard deviation of the estimates (n − 1). */
  spread: number;
  /** √mean((estimate − true)²). */
  rmse: number;
  /** Repetitions whose fit failed, with the first reason. */
  failed: number;
  firstFailure: string | null;
}

export interface BenchOptions {
  onProgress?: (fraction: number) => void;
  shouldCancel?: () => boolean;
}

/**
 * The slope bench: `repetitions` series from `truth` (seeds `truth.seed + r`), each estimated by every setting on
 * the same series (a paired comparison), with the product's own Welch and aperiodic fit (`welchPsd`, `fitAperiodic`).
 */
export function runSlopeBench(truth: SimulationSettings, settings: FitSetting[], repetitions: number, options: BenchOptions = {}): BenchSetting[] {
  const fs = truth.sampleRateHz;
  const estimates = settings.map(() => new Float64Array(repetitions).fill(NaN));
  const failures = settings.map(() => ({ count: 0, first: null as string | null }));
  for (let r = 0; r < repetitions; r++) {
    if (options.shouldCancel?.()) throw new AnalysisCancelledError();
    const x = simulateAperiodic({ ...truth, seed: truth.seed + r });
    settings.forEach((s, i) => {
      try {
        const n = roundHalfUp(s.segmentSeconds * fs);
        const w = welchPsd(x, fs, n, roundHalfUp(s.overlap * n));
        estimates[i][r] = fitAperiodic(w.frequencies, w.psd, s.range, s.model, { robust: s.robust }).exponent;
      } catch (e) {
        failures[i].count++;
        failures[i].first ??= e instanceof Error ? e.message : String(e);
      }
    });
    options.onProgress?.((r + 1) / repetitions);
  }
  return settings.map((s, i) => {
    const est = estimates[i];
    let n = 0;
    let sum = 0;
    let sq = 0;
    for (const v of est) {
      if (!Number.isFinite(v)) continue;
      n++;
      sum += v;
      sq += (v - truth.exponent) * (v - truth.exponent);
    }
    const mean = sum / n;
    let ss = 0;
    for (const v of est) if (Number.isFinite(v)) ss += (v - mean) * (v - mean);
    return {
      name: s.name,
      estimates: est,
      bias: n > 0 ? mean - truth.exponent : NaN,
      spread: n > 1 ? Math.sqrt(ss / (n - 1)) : NaN,
      rmse: n > 0 ? Math.sqrt(sq / n) : NaN,
      failed: failures[i].count,
      firstFailure: failures[i].first,
    };
  });
}
