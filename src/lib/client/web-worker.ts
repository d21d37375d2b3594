import type { PoolWorker } from '../../../workers/pool-worker';

/**
 * A module Web Worker as the pools see it (`PoolWorker`): its failures outside any call's answer (a script that did
 * not load, an error that escaped, a message that could not be read) reach the listener in words. The caller starts
 * the worker itself with `new Worker(new URL('…', import.meta.url), { type: 'module' })`, the form the bundler
 * recognises.
 */
export function webPoolWorker(worker: Worker, notLoaded = 'its script did not load'): PoolWorker {
  return {
    endpoint: worker,
    terminate: () => worker.terminate(),
    onFailure: (listener) => {
      worker.addEventListener('error', (event) => {
        event.preventDefault();
        listener(event instanceof ErrorEvent && event.message ? event.message : notLoaded);
      });
      worker.addEventListener('messageerror', () => listener('a message from it could not be read'));
    },
  };
}
