// Builds pool workers on node:worker_threads for `npm run bench` and tests. Each worker registers tsx itself
// (a data: URL bootstrap), because Node 20 workers do not reliably inherit `--import tsx` from their parent.
import nodeEndpoint from 'comlink/dist/esm/node-adapter.mjs';
import { createRequire } from 'node:module';
import { pathToFileURL } from 'node:url';
import { Worker } from 'node:worker_threads';
import type { PoolWorker } from '../src/lib/client/decompose-pool';

const tsxApi = pathToFileURL(
  createRequire(import.meta.url).resolve('tsx/package.json').replace(/package\.json$/, 'dist/esm/api/index.mjs'),
).href;
const entry = new URL('./decompose.node-worker.ts', import.meta.url).href;
const bootstrap = `import { register } from ${JSON.stringify(tsxApi)}; register(); await import(${JSON.stringify(entry)});`;

export function createNodeDecomposeWorker(): PoolWorker {
  const worker = new Worker(new URL(`data:text/javascript,${encodeURIComponent(bootstrap)}`));
  return {
    endpoint: nodeEndpoint(worker as never),
    terminate: () => {
      void worker.terminate();
    },
  };
}
