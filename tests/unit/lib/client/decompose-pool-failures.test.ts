// The pool when workers misbehave: a worker that throws on one channel, one whose script never loads, one that
// exits mid-channel, and cancel() while a worker is stuck. Each run must end (never hang) with a message naming
// the channel, every worker must be terminated, and the next run on the same pool must give runRecipe's bits.
import * as Comlink from 'comlink';
import { MessageChannel, Worker } from 'node:worker_threads';
import { describe, expect, it } from 'vitest';
import { AnalysisCancelledError } from '../../../../src/lib/analysis/errors';
import type { Recording } from '../../../../src/lib/analysis/recording';
import { runRecipe } from '../../../../src/lib/analysis/run-recipe';
import { DecomposePool, PoolWorkerError, type PoolWorker } from '../../../../src/lib/client/decompose-pool';
import { resultOfRun } from '../../../../src/lib/client/result-json';
import { decomposeApi, type ChannelJob } from '../../../../workers/decompose-api';
import { nodePoolWorker, tsxBootstrap } from '../../../../workers/node-worker-factory';
import { seededNormal } from '../../../helpers/seeded-random';

// Scenario of our own: four channels at 128 Hz, 30 s, a "knock" cue every 2 s.
function makeRecording(): Recording {
  const fs = 128;
  const normal = seededNormal(29);
  const names = ['F3', 'F4', 'Cz', 'Pz'];
  const data = names.map(() => Float32Array.from({ length: 30 * fs }, () => 4 * normal()));
  const events = Array.from({ length: 13 }, (_, k) => ({ onsetSeconds: 2 + 2 * k, durationSeconds: 0, label: 'knock' }));
  return { sampleRateHz: fs, channelNames: names, data, events };
}

const recipe = {
  format: 2,
  epochs: { events: ['knock'], start: -0.4, end: 1.0 },
  frequencies: { min: 6, max: 30, count: 5, spacing: 'log' },
  cycles: { fixed: 4 },
  baseline: { start: -0.3, end: -0.1, method: 'decibel', scope: 'average' },
  spectrum: { segment: 1, overlap: 0.5, range: [1, 50], source: 'recording' },
  aperiodic: { range: [2, 40], model: 'power-law' },
};

type Behaviour = 'works' | { throwOn: string } | { neverLoads: string } | 'stalls';

/**
 * In-process workers over a MessageChannel running the real worker API through comlink, with a behaviour the
 * test can change between runs. Counts how many were made and how many the pool terminated.
 */
function fakeWorkers(initial: Behaviour) {
  const state = { behaviour: initial, created: 0, terminated: 0, jobs: [] as string[] };
  const factory = (): PoolWorker => {
    state.created++;
    const behaviour = state.behaviour;
    const { port1, port2 } = new MessageChannel();
    let failure: ((problem: string) => void) | null = null;
    let timer: ReturnType<typeof setTimeout> | null = null;
    if (typeof behaviour === 'object' && 'neverLoads' in behaviour) {
      // Like a module worker whose script is missing: no answer ever, then an error event.
      timer = setTimeout(() => failure?.(behaviour.neverLoads), 20);
    } else {
      Comlink.expose(
        {
          run(job: ChannelJob, onProgress?: (fraction: number) => void) {
            state.jobs.push(job.channel ?? '?');
            if (behaviour === 'stalls') return new Promise(() => undefined);
            if (typeof behaviour === 'object' && job.channel === behaviour.throwOn) throw new RangeError(`synthetic fault while decomposing ${job.channel}`);
            return decomposeApi.run(job, onProgress);
          },
        },
        port2 as unknown as Comlink.Endpoint,
      );
    }
    return {
      endpoint: port1 as unknown as Comlink.Endpoint,
      terminate: () => {
        state.terminated++;
        if (timer !== null) clearTimeout(timer);
        port1.close();
        port2.close();
      },
      onFailure: (listener) => (failure = listener),
    };
  };
  return { state, factory };
}

/** Settles within `ms` or fails the test with "hung" (the pool must never leave a run waiting). */
function within<T>(promise: Promise<T>, ms: number): Promise<T> {
  return Promise.race([promise, new Promise<never>((_, reject) => setTimeout(() => reject(new Error(`hung for ${ms} ms`)), ms))]);
}

describe('DecomposePool when a worker fails', () => {
  const recording = makeRecording();
  const reference = JSON.stringify(runRecipe(recording, recipe));

  it('rejects with the channel named when a worker throws, terminates every worker, and runs cleanly next time', async () => {
    const { state, factory } = fakeWorkers({ throwOn: 'Cz' });
    const pool = new DecomposePool({ size: 2, createWorker: factory });
    const error = await within(pool.run(recording, recipe), 10_000).catch((e: unknown) => e);
    expect(error).toBeInstanceOf(PoolWorkerError);
    expect((error as PoolWorkerError).channel).toBe('Cz');
    expect((error as Error).message).toBe('the analysis worker failed on channel "Cz": synthetic fault while decomposing Cz');
    expect(state.created).toBe(2);
    expect(state.terminated).toBe(2);
    const sent = state.jobs.length;
    await new Promise((r) => setTimeout(r, 50));
    expect(state.jobs.length).toBe(sent); // nothing more is sent after the fault

    state.behaviour = 'works';
    const again = await within(pool.run(recording, recipe), 10_000);
    expect(JSON.stringify(resultOfRun(again))).toBe(reference);
    expect(state.created).toBe(4);
    pool.terminate();
    expect(state.terminated).toBe(4);
  });

  it('rejects instead of hanging when a worker never loads, naming the channel it was given', async () => {
    const { state, factory } = fakeWorkers({ neverLoads: 'its script did not load (404)' });
    const pool = new DecomposePool({ size: 1, createWorker: factory });
    await expect(within(pool.run(recording, recipe), 5_000)).rejects.toThrow('the analysis worker failed on channel "F3": its script did not load (404)');
    expect(state.terminated).toBe(state.created);
    state.behaviour = 'works';
    expect(JSON.stringify(resultOfRun(await within(pool.run(recording, recipe), 10_000)))).toBe(reference);
    pool.terminate();
  });

  it('says so when the worker cannot even be constructed', async () => {
    const pool = new DecomposePool({
      size: 1,
      createWorker: () => {
        throw new Error('Worker is not defined');
      },
    });
    await expect(within(pool.run(recording, recipe), 1_000)).rejects.toThrow('the analysis worker failed: it could not be started (Worker is not defined)');
  });

  it('cancel() rejects at once while a worker is stuck, and the pool takes the next run straight away', async () => {
    const { state, factory } = fakeWorkers('stalls');
    const pool = new DecomposePool({ size: 2, createWorker: factory });
    const stuck = pool.run(recording, recipe);
    await new Promise((r) => setTimeout(r, 20));
    expect(state.jobs).toEqual(['F3', 'F4']);
    state.behaviour = 'works';
    pool.cancel();
    const next = pool.run(recording, recipe); // no await in between: the cancelled run no longer blocks the pool
    const error = await within(stuck, 200).catch((e: unknown) => e);
    expect(error).toBeInstanceOf(AnalysisCancelledError);
    expect(state.terminated).toBe(2);
    expect(JSON.stringify(resultOfRun(await within(next, 10_000)))).toBe(reference);
    pool.terminate();
  });
});

describe('DecomposePool on real worker threads that fail', () => {
  const recording = makeRecording();

  it('a worker whose module is missing ends the run with the loader’s message', async () => {
    const missing = new URL('../../../../workers/no-such-analysis.worker.ts', import.meta.url).href;
    const pool = new DecomposePool({ size: 1, createWorker: () => nodePoolWorker(new Worker(tsxBootstrap(missing))) });
    await expect(within(pool.run(recording, recipe), 20_000)).rejects.toThrow(/^the analysis worker failed on channel "F3": .*no-such-analysis\.worker\.ts/);
  }, 30_000);

  it('a worker that exits in the middle of a channel ends the run with its exit code', async () => {
    const code = `import { parentPort } from 'node:worker_threads'; parentPort.on('message', () => process.exit(3));`;
    const pool = new DecomposePool({ size: 1, createWorker: () => nodePoolWorker(new Worker(new URL(`data:text/javascript,${encodeURIComponent(code)}`))) });
    await expect(within(pool.run(recording, recipe), 10_000)).rejects.toThrow('the analysis worker failed on channel "F3": it exited with code 3');
  }, 30_000);
});
