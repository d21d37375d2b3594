// The worker's API lives apart from its entry file so the browser entry and the Node entry expose the same object.
import * as Comlink from 'comlink';
import { analyzeChannel, type ChannelAnalysis, type RecipePlan } from '../src/lib/analysis/analyze-channel';
import { summarizeChannel, type ChannelSummary, type ResolvedSummarySpec } from '../src/lib/analysis/summary';

export interface ChannelJob {
  plan: RecipePlan;
  /**
   * One channel's samples, µV: the page's own shared array on a cross-origin-isolated page (read only: never write
   * into it), else a copy transferred in.
   */
  samples: Float32Array;
  /** The channel's name, for messages. */
  channel?: string;
  singleTrials?: boolean;
  /** With `singleTrials`: also each trial's coarse power samples (the explorer's live re-normalization). */
  coarseTrials?: boolean;
  /** Also each epoch's Welch spectrum (the Spectrum screen), from the samples this worker already holds. */
  epochSpectra?: boolean;
}

function buffersOf(out: ChannelAnalysis): ArrayBuffer[] {
  const e = out.epochSpectra;
  const arrays: ArrayBufferView[] = [
    ...out.power,
    ...out.normalized,
    ...(out.itpc ?? []),
    ...(out.evoked ?? []),
    out.psd,
    out.spectrumFrequencies,
    out.welch.frequencies,
    out.welch.psd,
    ...(e === null ? [] : [e.frequencies, e.perTrial, e.mean]),
    ...(out.singleTrials ?? []),
    ...(out.coarseTrials?.samples ?? []),
  ];
  // Shared memory cannot be transferred (and needs not be).
  return [...new Set(arrays.map((a) => a.buffer).filter((b): b is ArrayBuffer => b instanceof ArrayBuffer))];
}

export const decomposeApi = {
  run(job: ChannelJob, onProgress?: (fraction: number) => void): ChannelAnalysis {
    const out = analyzeChannel(job.plan, job.samples, { singleTrials: job.singleTrials, coarseTrials: job.coarseTrials, epochSpectra: job.epochSpectra, onProgress });
    return Comlink.transfer(out, buffersOf(out)); // transfer big arrays, never clone them
  },
  /** Channel `index`'s share of an analysis session's summary; its single trials stay (and die) in the worker. */
  summarize(job: ChannelJob & { index: number }, spec: ResolvedSummarySpec): ChannelSummary {
    const part = summarizeChannel(job.plan, job.index, analyzeChannel(job.plan, job.samples, { singleTrials: true }), spec);
    return Comlink.transfer(part, (part.mapNormalized ?? []).map((m) => m.buffer as ArrayBuffer));
  },
};

export type DecomposeApi = typeof decomposeApi;
