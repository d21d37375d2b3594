import { fitAperiodic, type AperiodicFit, type AperiodicModel } from './aperiodic';
import type { BaselineMethod, BaselineScope, BaselineSpread } from './baseline';
import type { ChannelType, ChannelUnit } from './channel-types';
import { decomposeChannel, type CoarseTrials, type DecomposeOptions } from './decompose';
import { epochSpectra, epochSpectraFrom, type EpochSpectra } from './epoch-spectra';
import { welchNested, welchPsd, type WelchSpectrum } from './welch';

// Kept apart from run-recipe.ts (which validates recipes with zod) so a worker loads only the numeric code.

const EPS = 1e-9;

/** Everything a channel needs besides its samples; plain data and typed arrays, so it crosses to workers as is. */
export interface RecipePlan {
  sampleRateHz: number;
  channels: string[];
  /** Index into the conditioned recording's `data` (see `planRun`) of each planned channel. */
  channelIndices: number[];
  channelTypes: ChannelType[];
  /** Unit of each channel's samples (power is in unit²). */
  channelUnits: ChannelUnit[];
  labels: string[];
  epochStarts: Int32Array[];
  /** Per condition, epochs dropped (outside the recording or across a gap). */
  dropped: number[];
  /** Per condition, fitting epochs left out by rejection rules or by hand. */
  rejected: number[];
  epochSamples: number;
  /** `epochs.start`, seconds from the event. */
  epochStartSeconds: number;
  times: Float64Array;
  frequencies: Float64Array;
  sigmas: Float64Array;
  edgeSeconds: Float64Array;
  baseline: { first: number; last: number; method: BaselineMethod; scope: BaselineScope; spread: BaselineSpread };
  /** `conditionSpans` (source `epochs` only): each condition's epoch spans, for one aperiodic fit per condition. */
  spectrum: { segmentSamples: number; overlapSamples: number; range: [number, number]; spans: Int32Array; conditionSpans: Int32Array[] | null };
  aperiodic: { range: [number, number]; model: AperiodicModel };
  /** Inter-trial phase consistency per condition beside power (recipe `"itpc": true`). */
  itpc: boolean;
  /** Induced power: each condition's evoked response is subtracted from its epochs first (recipe `trialPower`). */
  induced: boolean;
  warnings: string[];
}

/** One channel's share of the result, in typed arrays (see `assembleResult`). */
export interface ChannelAnalysis {
  power: Float64Array[];
  normalized: Float64Array[];
  singleTrials: Float32Array[] | null;
  /** With option `coarseTrials` (and `singleTrials`): each trial's coarse power samples (decompose.ts); else null. */
  coarseTrials: CoarseTrials | null;
  /** Per condition, inter-trial phase consistency `[f·L + t]` (0 … 1), when the plan asks for it; else null. */
  itpc: Float64Array[] | null;
  /** Per condition, the evoked response (µV per time point) with induced power; else null. */
  evoked: Float64Array[] | null;
  /** Welch density over the bins inside `spectrum.range`, µV²/Hz. */
  psd: Float64Array;
  spectrumFrequencies: Float64Array;
  /** The same Welch spectrum over every bin, 0 Hz … Nyquist (the aperiodic fit's input), µV²/Hz. */
  welch: { frequencies: Float64Array; psd: Float64Array };
  /**
   * With option `epochSpectra`: one Welch spectrum per kept epoch of every condition (plan label order) over the
   * bins inside `spectrum.range` (`epochSpectra` in epoch-spectra.ts); else null.
   */
  epochSpectra: EpochSpectra | null;
  aperiodic: AperiodicFit;
  /** With spectrum source `epochs`, the fit of each condition's own epochs, in plan label order; else null. */
  aperiodicByCondition: AperiodicFit[] | null;
}

export interface ChannelOptions extends DecomposeOptions {
  singleTrials?: boolean;
  /** With `singleTrials`: also each trial's coarse power samples, for the explorer's live re-normalization. */
  coarseTrials?: boolean;
  /** Also each epoch's own Welch spectrum (the Spectrum screen's spread across epochs), from the same samples. */
  epochSpectra?: boolean;
}

/** Every condition's epoch starts in plan label order, as one array (the per-epoch spectra's order). */
function allEpochStarts(plan: Pick<RecipePlan, 'epochStarts'>): Int32Array {
  const starts = new Int32Array(plan.epochStarts.reduce((n, s) => n + s.length, 0));
  let o = 0;
  for (const s of plan.epochStarts) {
    starts.set(s, o);
    o += s.length;
  }
  return starts;
}

/**
 * One channel's whole analysis: wavelet power per condition (`decomposeChannel`), the Welch spectrum and the
 * aperiodic fit. Pure in (plan, samples): a channel gives the same bits in the main thread, a worker or the CLI.
 */
export function analyzeChannel(plan: RecipePlan, samples: Float32Array, options: ChannelOptions = {}): ChannelAnalysis {
  const tf = decomposeChannel(
    {
      samples,
      epochStarts: plan.epochStarts,
      epochSamples: plan.epochSamples,
      sampleRateHz: plan.sampleRateHz,
      frequencies: plan.frequencies,
      sigmas: plan.sigmas,
      baseline: plan.baseline,
      singleTrials: options.singleTrials === true,
      coarseTrials: options.coarseTrials === true,
      itpc: plan.itpc === true,
      induced: plan.induced === true,
    },
    options,
  );
  const sp = plan.spectrum;
  const fs = plan.sampleRateHz;
  const wantEpochs = options.epochSpectra === true;
  let welch: WelchSpectrum;
  let byCondition: WelchSpectrum[] | null = null;
  let perEpoch: EpochSpectra | null = null;
  const groupOfSpan = Int32Array.from(plan.epochStarts.flatMap((starts, c) => Array.from(starts, () => c)));
  if (sp.conditionSpans !== null && 2 * groupOfSpan.length === sp.spans.length) {
    // Spectrum from the kept epochs: each span is one epoch, so the recipe's average, each condition's and each
    // epoch's own share their segments, and one walk makes all three (the same bits as three separate passes).
    const nested = welchNested(samples, fs, sp.segmentSamples, sp.overlapSamples, sp.spans, groupOfSpan, plan.epochStarts.length, wantEpochs && sp.segmentSamples <= plan.epochSamples);
    welch = nested.all;
    byCondition = nested.byGroup;
    if (nested.bySpan !== null) perEpoch = epochSpectraFrom(welch.frequencies, nested.bySpan, groupOfSpan.length, sp.range);
  } else {
    welch = welchPsd(samples, fs, sp.segmentSamples, sp.overlapSamples, sp.spans);
    if (sp.conditionSpans !== null) byCondition = sp.conditionSpans.map((spans) => welchPsd(samples, fs, sp.segmentSamples, sp.overlapSamples, spans));
  }
  if (wantEpochs && perEpoch === null) perEpoch = epochSpectra(samples, fs, allEpochStarts(plan), plan.epochSamples, sp.segmentSamples, sp.overlapSamples, sp.range);
  const aperiodic = fitAperiodic(welch.frequencies, welch.psd, plan.aperiodic.range, plan.aperiodic.model);
  // One fit per condition, on Welch over that condition's kept epochs only (same segments, same range).
  const aperiodicByCondition = byCondition === null ? null : byCondition.map((w) => fitAperiodic(w.frequencies, w.psd, plan.aperiodic.range, plan.aperiodic.model));
  let k0 = 0;
  while (k0 < welch.frequencies.length && welch.frequencies[k0] < sp.range[0] - EPS) k0++;
  let k1 = k0;
  while (k1 < welch.frequencies.length && welch.frequencies[k1] <= sp.range[1] + EPS) k1++;
  return {
    power: tf.power,
    normalized: tf.normalized,
    singleTrials: tf.singleTrials,
    coarseTrials: tf.coarseTrials,
    itpc: tf.itpc,
    evoked: tf.evoked,
    psd: welch.psd.slice(k0, k1),
    spectrumFrequencies: welch.frequencies.slice(k0, k1),
    welch: { frequencies: welch.frequencies, psd: welch.psd },
    epochSpectra: perEpoch,
    aperiodic,
    aperiodicByCondition,
  };
}
