// The worker's API lives apart from its entry file so the browser entry and the Node entry expose the same object.
import * as Comlink from 'comlink';
import { analyzeChannel, type ChannelAnalysis, type RecipePlan } from '../src/lib/analysis/analyze-channel';

export interface ChannelJob {
  plan: RecipePlan;
  /** One channel's samples, µV; transferred in, so the caller sends a copy. */
  samples: Float32Array;
  /** The channel's name, for messages. */
  channel?: string;
  singleTrials?: boolean;
}

function buffersOf(out: ChannelAnalysis): ArrayBuffer[] {
  const arrays: ArrayBufferView[] = [...out.power, ...out.normalized, ...(out.itpc ?? []), ...(out.evoked ?? []), out.psd, out.spectrumFrequencies, ...(out.singleTrials ?? [])];
  return [...new Set(arrays.map((a) => a.buffer as ArrayBuffer))];
}

export const decomposeApi = {
  run(job: ChannelJob, onProgress?: (fraction: number) => void): ChannelAnalysis {
    const out = analyzeChannel(job.plan, job.samples, { singleTrials: job.singleTrials, onProgress });
    return Comlink.transfer(out, buffersOf(out)); // transfer big arrays, never clone them
  },
};

export type DecomposeApi = typeof decomposeApi;
