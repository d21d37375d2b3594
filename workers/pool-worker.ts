// A worker as its caller sees it, whatever starts it: a module Web Worker (src/lib/client) or a worker_threads
// Worker (node-worker-factory.ts, for benchmarks and tests). Defined here, beside the workers, so both sides import
// it downwards.
import type * as Comlink from 'comlink';

/** A worker as the pool sees it: a comlink endpoint and a way to stop it. */
export interface PoolWorker {
  endpoint: Comlink.Endpoint;
  terminate(): void;
  /**
   * Registers a listener for a failure outside any call's answer: the script did not load, an error escaped, or
   * the worker stopped by itself. Without it a worker that never loads would leave a run waiting forever.
   */
  onFailure?(listener: (problem: string) => void): void;
}
