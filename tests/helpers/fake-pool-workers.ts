// In-process workers for the decomposition pool: comlink over a node:worker_threads MessageChannel, running the
// real worker API (workers/decompose-api.ts), so the pool and the controller are the browser's own code. Counts
// every channel job sent, so a test can tell that a screen started no work of its own; `state.stall` makes workers
// made from then on never answer (a run to cancel).
import * as Comlink from 'comlink';
import { MessageChannel } from 'node:worker_threads';
import type { PoolWorker } from '../../src/lib/client/decompose-pool';
import { decomposeApi, type ChannelJob } from '../../workers/decompose-api';

export function countingPoolWorkers() {
  const state = { stall: false, created: 0, terminated: 0, jobs: [] as { channel: string | undefined; epochSpectra: boolean }[] };
  const factory = (): PoolWorker => {
    state.created++;
    const stall = state.stall;
    return channelWorker(
      {
        run: (job: ChannelJob, onProgress?: (f: number) => void) => {
          state.jobs.push({ channel: job.channel, epochSpectra: job.epochSpectra === true });
          return stall ? new Promise(() => undefined) : decomposeApi.run(job, onProgress);
        },
      },
      state,
    );
  };
  return { state, factory };
}

/** `api` exposed through comlink over a MessageChannel, as a pool worker; `state.terminated` counts terminations. */
export function channelWorker(api: object, state: { terminated: number }): PoolWorker {
  const { port1, port2 } = new MessageChannel();
  Comlink.expose(api, port2 as unknown as Comlink.Endpoint);
  return {
    endpoint: port1 as unknown as Comlink.Endpoint,
    terminate: () => {
      state.terminated++;
      port1.close();
      port2.close();
    },
  };
}
