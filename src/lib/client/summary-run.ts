import * as Comlink from 'comlink';
import type { Recording } from '../analysis/recording';
import { planRun, type RecipePlan } from '../analysis/run-recipe';
import { combineSummary, resolveSummarySpec, type ChannelSummary, type Summary, type SummarySpec } from '../analysis/summary';
import type { DecomposeApi } from '../../../workers/decompose-api';
import type { PoolWorker } from '../../../workers/pool-worker';

export interface SummaryRunOptions {
  /** Workers to run at once; default navigator.hardwareConcurrency − 1, between 1 and 4. */
  size?: number;
  /** Injected for Node (worker_threads) or tests; default a module Web Worker of the decomposition worker. */
  createWorker?: () => PoolWorker;
  /** The plan `planRun(input, recipe)` already made, when there is one. */
  planned?: { plan: RecipePlan; recording: Recording };
  onProgress?: (channelsDone: number, channels: number) => void;
  spec?: SummarySpec;
}

function browserWorker(): PoolWorker {
  const worker = new Worker(new URL('../../../workers/decompose.worker.ts', import.meta.url), { type: 'module' });
  return { endpoint: worker, terminate: () => worker.terminate() };
}

/**
 * The summary an analysis session uploads (`buildSummary`'s numbers, src/lib/analysis/summary.ts), computed channel
 * by channel in workers: each channel is decomposed again with its single trials, summarized where it was computed,
 * and only its small share comes back (`summarizeChannel`), so the trials of all channels never sit in memory at
 * once. The shares are put together here with `combineSummary`, as `buildSummary` does. Derived numbers only.
 */
export async function summarizeRecording(input: Recording, recipe: unknown, options: SummaryRunOptions = {}): Promise<{ summary: Summary; notices: string[] }> {
  const { plan, recording } = options.planned ?? planRun(input, recipe);
  const spec = resolveSummarySpec(plan, options.spec ?? {});
  const n = plan.channels.length;
  const cores = typeof navigator !== 'undefined' && navigator.hardwareConcurrency > 0 ? navigator.hardwareConcurrency : 2;
  const size = Math.max(1, Math.min(n, options.size ?? Math.min(4, Math.max(1, cores - 1))));
  const workers = Array.from({ length: size }, () => (options.createWorker ?? browserWorker)());
  const parts = new Array<ChannelSummary>(n);
  let next = 0;
  let done = 0;
  try {
    await Promise.all(
      workers.map(async (worker) => {
        const remote = Comlink.wrap<DecomposeApi>(worker.endpoint);
        while (next < n) {
          const c = next++;
          const samples = recording.data[plan.channelIndices[c]].slice();
          parts[c] = await remote.summarize(Comlink.transfer({ plan, samples, channel: plan.channels[c], index: c }, [samples.buffer]), spec);
          options.onProgress?.(++done, n);
        }
        remote[Comlink.releaseProxy]();
      }),
    );
  } finally {
    for (const w of workers) w.terminate();
  }
  return { summary: combineSummary(plan, parts, spec), notices: spec.notices };
}
