import { afterAll, describe, expect, it } from 'vitest';
import { runRecipe } from '../../../../src/lib/analysis/run-recipe';
import type { Recording } from '../../../../src/lib/analysis/recording';
import { DecomposePool } from '../../../../src/lib/client/decompose-pool';
import { resultOfRun } from '../../../../src/lib/client/result-json';
import { createNodeDecomposeWorker } from '../../../../workers/node-worker-factory';
import { seededNormal } from '../../../helpers/seeded-random';

// Scenario of our own: five channels at 128 Hz, 40 s, a "flash" cue every 1.5 s.
function makeRecording(): Recording {
  const fs = 128;
  const normal = seededNormal(17);
  const names = ['F3', 'F4', 'Cz', 'P3', 'P4'];
  const data = names.map(() => {
    const x = new Float32Array(40 * fs);
    for (let i = 0; i < x.length; i++) x[i] = 3 * normal();
    return x;
  });
  const events = Array.from({ length: 24 }, (_, k) => ({ onsetSeconds: 1 + 1.5 * k, durationSeconds: 0, label: 'flash' }));
  return { sampleRateHz: fs, channelNames: names, data, events };
}

const recipe = {
  format: 2,
  epochs: { events: ['flash'], start: -0.3, end: 1.0 },
  frequencies: { min: 5, max: 40, count: 6, spacing: 'linear' },
  cycles: { fixed: 4 },
  baseline: { start: -0.25, end: -0.05, method: 'percent-change', scope: 'trial' },
  spectrum: { segment: 1, overlap: 0.5, range: [1, 60], source: 'epochs' },
  aperiodic: { range: [2, 50], model: 'power-law-knee' },
};

describe('DecomposePool on worker threads', () => {
  const pool = new DecomposePool({ size: 2, createWorker: createNodeDecomposeWorker });
  afterAll(() => pool.terminate());

  it('assembles the same Result as runRecipe, bit for bit, with per-channel progress', async () => {
    const recording = makeRecording();
    const progress: number[] = [];
    const run = await pool.run(recording, recipe, {
      onProgress: (overall) => progress.push(overall),
      singleTrialChannel: 'Cz',
    });
    const { singleTrials } = run;
    const result = resultOfRun(run);
    expect(JSON.stringify(result)).toBe(JSON.stringify(runRecipe(recording, recipe)));
    expect(progress[progress.length - 1]).toBe(1);
    expect(singleTrials).not.toBeNull();
    expect(singleTrials![0].length).toBe(24 * 6 * result.times.length);
  }, 60_000);

  it('rejects a bad recipe with the field named and stops on cancel()', async () => {
    const recording = makeRecording();
    await expect(pool.run(recording, { ...recipe, channels: ['Oz'] })).rejects.toThrow(/^channels\[0\] names no signal/);
    // Cancel as soon as the first progress report shows work under way (a timer could fire after a fast run ended).
    const running = pool.run(recording, recipe, { onProgress: () => pool.cancel() });
    await expect(running).rejects.toThrow(/cancelled/);
    const again = await pool.run(recording, { ...recipe, channels: ['F3'] });
    expect(again.plan.channels).toEqual(['F3']);
    expect(resultOfRun(again).channels).toEqual(['F3']);
  }, 60_000);
});
