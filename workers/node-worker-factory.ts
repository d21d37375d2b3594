// Builds pool workers on node:worker_threads for `npm run bench` and tests. Each worker registers tsx itself
// (a data: URL bootstrap), because Node 20 workers do not reliably inherit `--import tsx` from their parent.
import nodeEndpoint from 'comlink/dist/esm/node-adapter.mjs';
import { createRequire } from 'node:module';
import { pathToFileURL } from 'node:url';
import { Worker } from 'node:worker_threads';
import type { PoolWorker } from './pool-worker';

const tsxApi = pathToFileURL(
  createRequire(import.meta.url).resolve('tsx/package.json').replace(/package\.json$/, 'dist/esm/api/index.mjs'),
).href;
const entry = new URL('./decompose.node-worker.ts', import.meta.url).href;
const mapTestEntry = new URL('./map-test.node-worker.ts', import.meta.url).href;

/** A data: URL module that registers tsx, then imports `entryUrl`. */
export function tsxBootstrap(entryUrl: string): URL {
  const code = `import { register } from ${JSON.stringify(tsxApi)}; register(); await import(${JSON.stringify(entryUrl)});`;
  return new URL(`data:text/javascript,${encodeURIComponent(code)}`);
}

/** A worker_threads Worker as the pool sees it: 'error' and an exit we did not ask for become failures. */
export function nodePoolWorker(worker: Worker): PoolWorker {
  let terminated = false;
  return {
    endpoint: nodeEndpoint(worker as never),
    terminate: () => {
      terminated = true;
      void worker.terminate();
    },
    onFailure: (listener) => {
      worker.on('error', (error: Error) => listener(error.message));
      worker.on('exit', (code: number) => {
        if (!terminated) listener(`it exited with code ${code}`);
      });
    },
  };
}

export function createNodeDecomposeWorker(): PoolWorker {
  return nodePoolWorker(new Worker(tsxBootstrap(entry)));
}

/** A worker_threads worker running the statistics map test (workers/map-test-api.ts). */
export function createNodeMapTestWorker(): PoolWorker {
  return nodePoolWorker(new Worker(tsxBootstrap(mapTestEntry)));
}
