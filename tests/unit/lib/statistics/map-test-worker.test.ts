import { describe, expect, it } from 'vitest';
import { seededNormal } from '../../../helpers/seeded-random';
import { Worker } from 'node:worker_threads';
import { MapTestWorkerError, runMapTestInWorker } from '../../../../src/lib/client/map-test-runner';
import { MapTestCancelledError } from '../../../../src/lib/statistics/errors';
import { runMapTestSync, type MapTestInput } from '../../../../src/lib/statistics/map-test';
import { createNodeMapTestWorker, nodePoolWorker } from '../../../../workers/node-worker-factory';

function cohort(n: number, nF: number, nT: number, seed: number): MapTestInput {
  const z = seededNormal(seed);
  const values = new Float64Array(n * nF * nT);
  for (let i = 0; i < values.length; i++) values[i] = z() + ((i % (nF * nT)) % nT < nT / 3 ? 0.8 : 0);
  return { values, nSubjects: n, nFrequencies: nF, nTimes: nT };
}

describe('map test in a worker (workers/map-test-api.ts on worker_threads)', () => {
  it('returns the same result as the in-process run, with progress up to 1', async () => {
    const input = cohort(11, 10, 30, 4);
    const fractions: number[] = [];
    const r = await runMapTestInWorker(input, { createWorker: createNodeMapTestWorker, onProgress: (f) => fractions.push(f) });
    const atResolve = fractions.length;
    await new Promise((resolve) => setTimeout(resolve, 50)); // a progress message still in flight must be dropped
    expect(fractions.length).toBe(atResolve);
    const local = runMapTestSync(input);
    expect(r.clusters).toEqual(local.clusters);
    expect(Array.from(r.nullDistribution)).toEqual(Array.from(local.nullDistribution));
    expect(fractions.at(-1)).toBe(1);
    expect(input.values[0]).toBe(cohort(11, 10, 30, 4).values[0]); // the caller's array was copied, not transferred
  });

  it('stops when the signal aborts: the worker receives cancel() and the run rejects with MapTestCancelledError', async () => {
    const input = cohort(13, 40, 256, 9); // 10,000 random flips: seconds of work, so the cancel surely arrives in time
    const controller = new AbortController();
    const fractions: number[] = [];
    const run = runMapTestInWorker(input, {
      createWorker: createNodeMapTestWorker,
      signal: controller.signal,
      onProgress: (f) => {
        fractions.push(f);
        if (f > 0) controller.abort();
      },
    });
    await expect(run).rejects.toBeInstanceOf(MapTestCancelledError);
    expect(fractions.at(-1)).toBeLessThan(1);
  });

  it('refuses bad input before starting a worker', async () => {
    let started = 0;
    const bad = { ...cohort(3, 2, 2, 1), nTimes: 3 };
    await expect(runMapTestInWorker(bad, { createWorker: () => (started++, createNodeMapTestWorker()) })).rejects.toThrow(/values has 12 entries/);
    expect(started).toBe(0);
  });

  it('rejects with MapTestWorkerError, not a hang, when the worker fails to load', async () => {
    const broken = () => nodePoolWorker(new Worker(new URL('data:text/javascript,throw new Error("no map test here")')));
    await expect(runMapTestInWorker(cohort(4, 2, 3, 1), { createWorker: broken })).rejects.toThrow(MapTestWorkerError);
    await expect(runMapTestInWorker(cohort(4, 2, 3, 1), { createWorker: broken })).rejects.toThrow(/the map test worker failed: .*no map test here/);
  });
});
