// The Slope check's worker: the bench, the sensitivity of one channel's fit and the broadband-shift check. Wiring
// only; the maths is in src/lib/analysis/slope-check. The bench runs in one synchronous stretch, so a cancel ends
// this worker (src/lib/client/slope-check.ts terminates it) rather than sending it a message.
import * as Comlink from 'comlink';
import type { AperiodicModel } from '../src/lib/analysis/aperiodic';
import { normalizeAverage, type BaselineIndices, type BaselineMethod } from '../src/lib/analysis/baseline';
import { welchPsd } from '../src/lib/analysis/welch';
import { bootstrapExponent, broadbandShift, compareAperiodicModels, explainedShare, exponentOverRanges, runSlopeSweep, windowFit, type SlopeSweepInput } from '../src/lib/analysis/slope-check';

const api = {
  /** The bench over the sweep's true exponents; `onProgress` gets the fraction done. */
  bench(input: SlopeSweepInput, onProgress?: (fraction: number) => void) {
    const cells = runSlopeSweep(input, { onProgress });
    return Comlink.transfer(cells, cells.map((c) => c.estimates.buffer as ArrayBuffer));
  },
  /**
   * One channel's spectrum (the recipe's Welch over `spans`), its exponent over fit-range starts × ends, a bootstrap
   * interval over its Welch segments and power law against knee by BIC over `range`.
   */
  sensitivity(
    samples: Float32Array,
    sampleRateHz: number,
    segmentSamples: number,
    overlapSamples: number,
    spans: Int32Array,
    range: [number, number],
    model: AperiodicModel,
    starts: number[],
    ends: number[],
    bootstrap: { repetitions: number; level: number; seed: number },
  ) {
    const w = welchPsd(samples, sampleRateHz, segmentSamples, overlapSamples, spans);
    const grid = exponentOverRanges(w.frequencies, w.psd, starts, ends, model);
    const interval = bootstrapExponent(samples, sampleRateHz, segmentSamples, overlapSamples, spans, range, model, bootstrap);
    const comparison = compareAperiodicModels(w.frequencies, w.psd, range);
    return { grid, interval: { estimate: interval.estimate, lower: interval.lower, upper: interval.upper, level: interval.level, segments: interval.segments }, comparison };
  },
  /**
   * The broadband-shift check of one channel and condition: aperiodic fits of the baseline and the post window
   * (`windowFit`, sample offsets inside the epoch = the map's time indices), the map a pure aperiodic change would
   * give (`broadbandShift`), the measured map normalized with the same baseline and method, and the share per band.
   */
  shift(
    samples: Float32Array,
    sampleRateHz: number,
    epochStarts: Int32Array,
    baseline: BaselineIndices,
    post: BaselineIndices,
    rangeHz: [number, number],
    model: AperiodicModel,
    frequencies: Float64Array,
    power: Float64Array,
    nTimes: number,
    method: BaselineMethod,
    neutral: number,
    bands: { name: string; low: number; high: number }[],
  ) {
    const baselineFit = windowFit(samples, sampleRateHz, epochStarts, baseline.first, baseline.last, rangeHz, model);
    const postFit = windowFit(samples, sampleRateHz, epochStarts, post.first, post.last, rangeHz, model);
    const predicted = broadbandShift(frequencies, baselineFit, postFit, method);
    const measured = normalizeAverage(power, nTimes, baseline, method);
    const shares = explainedShare(frequencies, measured, nTimes, post.first, post.last, predicted, bands, neutral);
    return Comlink.transfer({ baselineFit, postFit, predicted, measured, shares }, [predicted.buffer, measured.buffer] as ArrayBuffer[]);
  },
};

export type SlopeCheckWorkerApi = typeof api;
Comlink.expose(api);
