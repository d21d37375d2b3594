import * as Comlink from 'comlink';
import { MapTestCancelledError } from '../statistics/errors';
import { checkMapTestInput, type MapTestInput, type MapTestResult } from '../statistics/map-test';
import type { MapTestApi } from '../../../workers/map-test-api';
import type { PoolWorker } from './decompose-pool';
import { webPoolWorker } from './web-worker';

export interface MapTestRunnerOptions {
  onProgress?: (fraction: number) => void;
  /** Aborting sends cancel() to the worker; the run then rejects with MapTestCancelledError. */
  signal?: AbortSignal;
  /** Injected for Node (worker_threads) or tests; default a module Web Worker. */
  createWorker?: () => PoolWorker;
}

/** The map test worker failed (did not load, threw something other than bad input, or stopped by itself). */
export class MapTestWorkerError extends Error {
  constructor(readonly problem: string) {
    super(`the map test worker failed: ${problem}`);
    this.name = 'MapTestWorkerError';
  }
}

function browserWorker(): PoolWorker {
  return webPoolWorker(new Worker(new URL('../../../workers/map-test.worker.ts', import.meta.url), { type: 'module' }));
}

/**
 * Runs the map test (src/lib/statistics/map-test.ts) in a worker of its own, which is ended afterwards. Bad input
 * throws StatisticsInputError here, before any worker starts; the caller's `values` are copied, not transferred.
 * `onProgress` gets 1 before the promise resolves and nothing after it.
 */
export async function runMapTestInWorker(input: MapTestInput, options: MapTestRunnerOptions = {}): Promise<MapTestResult> {
  checkMapTestInput(input);
  if (options.signal?.aborted) throw new MapTestCancelledError();
  const worker = (options.createWorker ?? browserWorker)();
  const remote = Comlink.wrap<MapTestApi>(worker.endpoint);
  let failed: (error: Error) => void = () => undefined;
  const failure = new Promise<never>((_, reject) => (failed = reject));
  failure.catch(() => undefined);
  worker.onFailure?.((problem) => failed(new MapTestWorkerError(problem)));
  const onAbort = () => void remote.cancel().catch(() => undefined);
  options.signal?.addEventListener('abort', onAbort);
  try {
    const values = input.values.slice();
    const job: MapTestInput = { ...input, values };
    // Progress arrives on the proxy's own message port, the answer on the worker's: the two are not ordered, so a
    // late progress message is dropped and the caller gets 1 here, before the promise resolves.
    let settled = false;
    const onProgress = options.onProgress;
    const progress = onProgress === undefined ? undefined : Comlink.proxy((f: number) => void (settled || onProgress(f)));
    const result = await Promise.race([remote.run(Comlink.transfer(job, [values.buffer as ArrayBuffer]), progress), failure]);
    settled = true;
    onProgress?.(1);
    return result;
  } catch (error) {
    // comlink rebuilds a thrown Error from its name and message only
    if (error instanceof Error && error.name === 'MapTestCancelledError') throw new MapTestCancelledError();
    if (error instanceof MapTestWorkerError) throw error;
    throw new MapTestWorkerError(error instanceof Error ? error.message : String(error));
  } finally {
    options.signal?.removeEventListener('abort', onAbort);
    remote[Comlink.releaseProxy]();
    worker.terminate();
  }
}
