import * as Comlink from 'comlink';
import { AnalysisCancelledError } from '../analysis/errors';
import type { Recording } from '../analysis/recording';
import { planRun, type ChannelAnalysis } from '../analysis/run-recipe';
import type { RecipePlan } from '../analysis/analyze-channel';
import type { CoarseTrials } from '../analysis/decompose';
import type { DecomposeApi } from '../../../workers/decompose-api';
import type { PoolWorker } from '../../../workers/pool-worker';
import { webPoolWorker } from './web-worker';
import { forWorker } from '../formats/sample-arrays';

export type { PoolWorker };

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
  /** Also each channel's per-epoch Welch spectra (`ChannelAnalysis.epochSpectra`, the Spectrum screen). */
  epochSpectra?: boolean;
  /**
   * The plan `planRun(input, recipe)` already made for exactly this input and recipe (the workspace controller
   * plans once per recipe); the pool then does not plan again.
   */
  planned?: { plan: RecipePlan; recording: Recording };
}

/**
 * A run as the workers made it: the plan and each channel's typed arrays, moved from the workers (never cloned),
 * in plan channel order. `assembleResult(plan, channels)` gives the contract's Result JSON (export, CLI parity).
 */
export interface PoolResult {
  plan: RecipePlan;
  channels: ChannelAnalysis[];
  /** Per condition `[(trial·F + f)·T + t]` power of `singleTrialChannel`, µV²; null when not asked for. */
  singleTrials: Float32Array[] | null;
  /** The same trials' coarse power samples (decompose.ts `CoarseTrials`); null when not asked for. */
  coarseTrials: CoarseTrials | null;
}

/** A worker that could not start, failed to load, threw or stopped during a run; `channel` is the one it held. */
export class PoolWorkerError extends Error {
  readonly channel: string | null;
  readonly problem: string;

  constructor(channel: string | null, problem: string) {
    super(`the analysis worker failed${channel === null ? '' : ` on channel "${channel}"`}: ${problem}`);
    this.name = 'PoolWorkerError';
    this.channel = channel;
    this.problem = problem;
  }
}

function browserWorker(): PoolWorker {
  return webPoolWorker(
    new Worker(new URL('../../../workers/decompose.worker.ts', import.meta.url), { type: 'module' }),
    'its script did not load (a network error or a syntax error in the worker bundle)',
  );
}

function defaultSize(): number {
  const cores = typeof navigator !== 'undefined' && navigator.hardwareConcurrency > 0 ? navigator.hardwareConcurrency : 2;
  return Math.max(1, cores - 1);
}

function messageOf(error: unknown): string {
  return error instanceof Error ? error.message : String(error);
}

interface Slot {
  worker: PoolWorker;
  remote: Comlink.Remote<DecomposeApi>;
  /** The channel this worker is computing, or null when idle. */
  channel: string | null;
}

interface ActiveRun {
  done: boolean;
  /** Ends the run with `error` (once); later calls do nothing. */
  fail: (error: Error) => void;
}

/**
 * Splits a recipe's channels across workers running the same core as `runRecipe` and hands back what they made,
 * per channel in typed arrays: `analyzeChannel` is a pure function of (plan, samples), so the numbers match a
 * single-thread run bit for bit. `cancel()` stops a run: queued channels are never sent and busy workers are
 * terminated (a worker deep in a channel cannot read a flag until it returns) and replaced on the next run. A worker that fails (does
 * not load, throws, stops) ends the run with a PoolWorkerError naming the channel and terminates every worker,
 * so the next run starts on fresh ones.
 */
export class DecomposePool {
  readonly size: number;
  private readonly createWorker: WorkerFactory;
  private slots: Slot[] = [];
  private current: ActiveRun | null = null;

  constructor(options: PoolOptions = {}) {
    this.size = Math.max(1, Math.floor(options.size ?? defaultSize()));
    this.createWorker = options.createWorker ?? browserWorker;
  }

  private slot(i: number): Slot {
    while (this.slots.length <= i) {
      let worker: PoolWorker;
      try {
        worker = this.createWorker();
      } catch (error) {
        throw new PoolWorkerError(null, `it could not be started (${messageOf(error)})`);
      }
      const slot: Slot = { worker, remote: Comlink.wrap<DecomposeApi>(worker.endpoint), channel: null };
      worker.onFailure?.((problem) => this.failed(slot, problem));
      this.slots.push(slot);
    }
    return this.slots[i];
  }

  /** A worker reported a failure: end the current run with it, or just drop the worker when idle. */
  private failed(slot: Slot, problem: string): void {
    if (!this.slots.includes(slot)) return; // already terminated by us
    const run = this.current;
    if (run !== null && !run.done) {
      run.fail(new PoolWorkerError(slot.channel, problem));
    } else {
      this.slots = this.slots.filter((s) => s !== slot);
      stop(slot);
    }
  }

  /**
   * Runs a recipe; rejects with AnalysisInputError for a bad recipe, AnalysisCancelledError after cancel() and
   * PoolWorkerError when a worker fails. Never settles by hanging on a dead worker.
   */
  async run(input: Recording, recipe: unknown, options: PoolRunOptions = {}): Promise<PoolResult> {
    if (this.current !== null) throw new Error('DecomposePool: a run is already in progress; cancel() it first');
    // The recording as the recipe conditions it (types, bad channels, reference, filters), once, on this thread.
    const { plan, recording } = options.planned ?? planRun(input, recipe);
    let fail: (error: Error) => void = () => undefined;
    const ended = new Promise<never>((_, reject) => (fail = reject));
    ended.catch(() => undefined);
    const run: ActiveRun = {
      done: false,
      fail: (error) => {
        if (run.done) return;
        run.done = true;
        fail(error);
      },
    };
    this.current = run;
    try {
      const n = plan.channels.length;
      const fractions = new Array<number>(n).fill(0);
      const report = () => {
        if (!run.done) options.onProgress?.(fractions.reduce((a, b) => a + b, 0) / n, fractions);
      };
      const outputs = new Array<ChannelAnalysis>(n);
      const singleIndex = options.singleTrialChannel === undefined ? -1 : plan.channels.indexOf(options.singleTrialChannel);
      let next = 0;
      const lane = async (i: number) => {
        const slot = this.slot(i);
        while (!run.done && next < n) {
          const c = next++;
          const channel = plan.channels[c];
          const { samples, transfer } = forWorker(recording.data[plan.channelIndices[c]]);
          const job = { plan, samples, channel, singleTrials: c === singleIndex, coarseTrials: c === singleIndex, epochSpectra: options.epochSpectra === true };
          const onChannel = Comlink.proxy((f: number) => {
            fractions[c] = f;
            report();
          });
          slot.channel = channel;
          try {
            outputs[c] = await slot.remote.run(Comlink.transfer(job, transfer), onChannel);
          } catch (error) {
            throw new PoolWorkerError(channel, messageOf(error));
          } finally {
            slot.channel = null;
          }
          fractions[c] = 1;
          report();
        }
      };
      const lanes = Promise.all(Array.from({ length: Math.min(this.size, n) }, (_, i) => lane(i)));
      lanes.catch((error: unknown) => run.fail(error instanceof Error ? error : new Error(String(error))));
      await Promise.race([lanes, ended]);
      if (run.done) await ended; // a failure or cancel() that raced the last channel's answer wins
      run.done = true;
      const single = singleIndex >= 0 ? outputs[singleIndex] : null;
      return { plan, channels: outputs, singleTrials: single?.singleTrials ?? null, coarseTrials: single?.coarseTrials ?? null };
    } catch (error) {
      // A failed run leaves no worker busy on its channels: end them all (cancel() already did).
      if (!(error instanceof AnalysisCancelledError)) this.terminate();
      throw error;
    } finally {
      run.done = true;
      if (this.current === run) this.current = null;
    }
  }

  /**
   * Stops the current run (if any): its promise rejects with AnalysisCancelledError at once, its workers are
   * terminated, and the pool takes a new run straight away.
   */
  cancel(): void {
    const run = this.current;
    if (run === null) return;
    this.current = null;
    this.terminate();
    run.fail(new AnalysisCancelledError());
  }

  /** Ends every worker; the pool starts new ones on its next run. */
  terminate(): void {
    const slots = this.slots;
    this.slots = [];
    for (const s of slots) stop(s);
  }
}

function stop(slot: Slot): void {
  try {
    slot.remote[Comlink.releaseProxy]();
  } catch {
    // a proxy already released or an endpoint already closed: the worker is ended below either way
  }
  slot.worker.terminate();
}
