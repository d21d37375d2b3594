import * as Comlink from 'comlink';
import type { ExplorerWorkerApi } from '../../../workers/explorer.worker';

let remote: Comlink.Remote<ExplorerWorkerApi> | null = null;

/** The explorer's one worker (single-trial power of the shown channel, aperiodic refits), started on first use. */
export function explorerWorker(): Comlink.Remote<ExplorerWorkerApi> {
  if (remote === null) {
    const worker = new Worker(new URL('../../../workers/explorer.worker.ts', import.meta.url), { type: 'module' });
    remote = Comlink.wrap<ExplorerWorkerApi>(worker);
  }
  return remote;
}
