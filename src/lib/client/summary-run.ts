import * as Comlink from 'comlink';
import type { Recording } from '../analysis/recording';
import { planRun, type RecipePlan } from '../analysis/run-recipe';
import { combineSummary, resolveSummarySpec, SUMMARY_LIMITS, type ChannelSummary, type ResolvedSummarySpec, type Summary, type SummarySpec } from '../analysis/summary';
import type { DecomposeApi } from '../../../workers/decompose-api';
import type { PoolWorker } from '../../../workers/pool-worker';
import { webPoolWorker } from './web-worker';
import { forWorker } from '../formats/sample-arrays';

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

/**
 * The spec resolved for the plan; without `trialChannels` of its own, per-trial values are kept for as many
 * channels (in plan order) as the summary's caps allow (SUMMARY_LIMITS: values and rows), with a notice when that
 * is fewer than all, so a dense recording still gets its summary rather than a refusal.
 */
export function fittedSpec(plan: RecipePlan, spec: SummarySpec): ResolvedSummarySpec {
  if (spec.trialChannels !== undefined) return resolveSummarySpec(plan, spec);
  const probe = resolveSummarySpec(plan, { ...spec, trialChannels: [] });
  const cells = probe.bands.length * probe.windows.length;
  const trials = plan.epochStarts.reduce((n, e) => n + e.length, 0);
  const byValues = cells * trials === 0 ? plan.channels.length : Math.floor(SUMMARY_LIMITS.trialValuesTotal / (cells * trials));
  const byRows = cells * plan.labels.length === 0 ? plan.channels.length : Math.floor(SUMMARY_LIMITS.trialRows / (cells * plan.labels.length));
  const fit = Math.min(plan.channels.length, byValues, byRows);
  if (fit >= plan.channels.length) return resolveSummarySpec(plan, spec);
  const resolved = resolveSummarySpec(plan, { ...spec, trialChannels: plan.channels.slice(0, fit) });
  resolved.notices.push(`summary: per-trial values kept for the first ${fit} of ${plan.channels.length} channels (${plan.channels.slice(0, fit).join(', ') || 'none'}); more would pass the summary's cap of ${SUMMARY_LIMITS.trialValuesTotal} values`);
  return resolved;
}

function browserWorker(): PoolWorker {
  return webPoolWorker(
    new Worker(new URL('../../../workers/decompose.worker.ts', import.meta.url), { type: 'module' }),
    'its script did not load (a network error or a syntax error in the worker bundle)',
  );
}

/**
 * The summary an analysis session uploads (`buildSummary`'s numbers, src/lib/analysis/summary.ts), computed channel
 * by channel in workers: each channel is decomposed again with its single trials, summarized where it was computed,
 * and only its small share comes back (`summarizeChannel`), so the trials of all channels never sit in memory at
 * once. The shares are put together here with `combineSummary`, as `buildSummary` does. Derived numbers only.
 */
export async function summarizeRecording(input: Recording, recipe: unknown, options: SummaryRunOptions = {}): Promise<{ summary: Summary; notices: string[] }> {
  const { plan, recording } = options.planned ?? planRun(input, recipe);
  const spec = fittedSpec(plan, options.spec ?? {});
  const n = plan.channels.length;
  const cores = typeof navigator !== 'undefined' && navigator.hardwareConcurrency > 0 ? navigator.hardwareConcurrency : 2;
  const size = Math.max(1, Math.min(n, options.size ?? Math.min(4, Math.max(1, cores - 1))));
  const workers = Array.from({ length: size }, () => (options.createWorker ?? browserWorker)());
  const parts = new Array<ChannelSummary>(n);
  let next = 0;
  let done = 0;
  // A worker that fails outside any answer (its script did not load, an error escaped) would leave its call waiting
  // for ever: its failure ends the whole run instead.
  let stop: (error: Error) => void = () => undefined;
  const failed = new Promise<never>((_, reject) => (stop = reject));
  failed.catch(() => undefined);
  for (const w of workers) w.onFailure?.((problem) => stop(new Error(`the summary worker failed: ${problem}`)));
  try {
    const lanes = Promise.all(
      workers.map(async (worker) => {
        const remote = Comlink.wrap<DecomposeApi>(worker.endpoint);
        while (next < n) {
          const c = next++;
          const { samples, transfer } = forWorker(recording.data[plan.channelIndices[c]]);
          parts[c] = await remote.summarize(Comlink.transfer({ plan, samples, channel: plan.channels[c], index: c }, transfer), spec);
          options.onProgress?.(++done, n);
        }
        // No releaseProxy here: in Node it lets an idle worker exit (code 0) while another lane still works, and that
        // exit reads as a failure. The `finally` below ends every worker once all lanes are done.
      }),
    );
    await Promise.race([lanes, failed]);
  } finally {
    for (const w of workers) w.terminate();
  }
  return { summary: combineSummary(plan, parts, spec), notices: spec.notices };
}
