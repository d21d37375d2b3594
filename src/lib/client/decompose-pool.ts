import * as Comlink from 'comlink';
import { AnalysisCancelledError } from '../analysis/errors';
import type { Recording } from '../analysis/recording';
import { assembleResult, planRecipe, type AnalysisResult, type ChannelAnalysis } from '../analysis/run-recipe';
import type { DecomposeApi } from '../../../workers/decompose-api';

/** A worker as the pool sees it: a comlink endpoint and a way to stop it. */
export interface PoolWorker {
  endpoint: Comlink.Endpoint;
  terminate(): void;
}

export type WorkerFactory = () => PoolWorker;

export interface PoolOptions {
  /** Workers to run; default navigator.hardwareConcurrency − 1, at least 1. */
  size?: number;
  /** Injected for Node (worker_threads) or tests; default a module Web Worker. */
  createWorker?: WorkerFactory;
}

export interface PoolRunOptions {
  /** Overall fraction done and each channel's own fraction, both 0 … 1. */
  onProgress?: (overall: number, perChannel: readonly number[]) => void;
  /** Keep single-trial power for this one channel (the explorer's trial view). */
  singleTrialChannel?: string;
}

export interface PoolResult {
  result: AnalysisResult;
  /** Per condition `[(trial·F + f)·T + t]` power of `singleTrialChannel`, µV²; null when not asked for. */
  singleTrials: Float32Array[] | null;
}

function browserWorker(): PoolWorker {
  const worker = new Worker(new URL('../../../workers/decompose.worker.ts', import.meta.url), { type: 'module' });
  return { endpoint: worker, terminate: () => worker.terminate() };
}

function defaultSize(): number {
  const cores = typeof navigator !== 'undefined' && navigator.hardwareConcurrency > 0 ? navigator.hardwareConcurrency : 2;
  return Math.max(1, cores - 1);
}

interface Slot {
  worker: PoolWorker;
  remote: Comlink.Remote<DecomposeApi>;
}

/**
 * Splits a recipe's channels across workers running the same core as `runRecipe`, then assembles the same
 * Result: `analyzeChannel` is a pure function of (plan, samples), so the numbers match a single-thread run bit
 * for bit. `cancel()` stops a run: queued channels are never sent and busy workers are terminated (a worker
 * deep in a channel cannot read a flag until it returns) and replaced on the next run.
 */
export class DecomposePool {
  readonly size: number;
  private readonly createWorker: WorkerFactory;
  private slots: Slot[] = [];
  private running = false;
  private cancelRun: (() => void) | null = null;

  constructor(options: PoolOptions = {}) {
    this.size = Math.max(1, Math.floor(options.size ?? defaultSize()));
    this.createWorker = options.createWorker ?? browserWorker;
  }

  private slot(i: number): Slot {
    while (this.slots.length <= i) {
      const worker = this.createWorker();
      this.slots.push({ worker, remote: Comlink.wrap<DecomposeApi>(worker.endpoint) });
    }
    return this.slots[i];
  }

  /** Runs a recipe; rejects with AnalysisInputError for a bad recipe and AnalysisCancelledError after cancel(). */
  async run(recording: Recording, recipe: unknown, options: PoolRunOptions = {}): Promise<PoolResult> {
    if (this.running) throw new Error('DecomposePool: a run is already in progress; cancel() it first');
    this.running = true;
    try {
      const plan = planRecipe(recording, recipe);
      const n = plan.channels.length;
      const fractions = new Array<number>(n).fill(0);
      const report = () => options.onProgress?.(fractions.reduce((a, b) => a + b, 0) / n, fractions);
      const outputs = new Array<ChannelAnalysis>(n);
      const singleIndex = options.singleTrialChannel === undefined ? -1 : plan.channels.indexOf(options.singleTrialChannel);
      let next = 0;
      let cancelled = false;
      const cancelledPromise = new Promise<never>((_, reject) => {
        this.cancelRun = () => {
          cancelled = true;
          reject(new AnalysisCancelledError());
        };
      });
      cancelledPromise.catch(() => undefined);
      const lane = async (i: number) => {
        const { remote } = this.slot(i);
        while (!cancelled && next < n) {
          const c = next++;
          const samples = recording.data[plan.channelIndices[c]].slice();
          const job = { plan, samples, singleTrials: c === singleIndex };
          const onChannel = Comlink.proxy((f: number) => {
            fractions[c] = f;
            report();
          });
          outputs[c] = await remote.run(Comlink.transfer(job, [samples.buffer]), onChannel);
          fractions[c] = 1;
          report();
        }
      };
      const lanes = Array.from({ length: Math.min(this.size, n) }, (_, i) => lane(i));
      await Promise.race([Promise.all(lanes), cancelledPromise]);
      return { result: assembleResult(plan, outputs), singleTrials: singleIndex >= 0 ? outputs[singleIndex].singleTrials : null };
    } finally {
      this.running = false;
      this.cancelRun = null;
    }
  }

  /** Stops the current run (if any); its promise rejects with AnalysisCancelledError. */
  cancel(): void {
    if (this.cancelRun === null) return;
    const stop = this.cancelRun;
    this.cancelRun = null;
    this.terminate();
    stop();
  }

  /** Ends every worker; the pool starts new ones on its next run. */
  terminate(): void {
    for (const s of this.slots) {
      s.remote[Comlink.releaseProxy]();
      s.worker.terminate();
    }
    this.slots = [];
  }
}
