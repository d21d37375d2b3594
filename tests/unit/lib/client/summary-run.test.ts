import { describe, expect, it } from 'vitest';
import { analyzeChannel, planRun } from '../../../../src/lib/analysis/run-recipe';
import type { Recording } from '../../../../src/lib/analysis/recording';
import { buildSummary } from '../../../../src/lib/analysis/summary';
import { SummaryInput } from '../../../../src/lib/schemas/review';
import { summarizeRecording } from '../../../../src/lib/client/summary-run';
import { createNodeDecomposeWorker } from '../../../../workers/node-worker-factory';
import { seededNormal } from '../../../helpers/seeded-random';

// Scenario of our own: four channels at 128 Hz, 40 s, "gull" and "buoy" cues in turn every 1.5 s.
function makeRecording(): Recording {
  const fs = 128;
  const normal = seededNormal(29);
  const names = ['Fz', 'Cz', 'Pz', 'Oz'];
  const data = names.map(() => Float32Array.from({ length: 40 * fs }, () => 4 * normal()));
  const events = Array.from({ length: 24 }, (_, k) => ({ onsetSeconds: 1 + 1.5 * k, durationSeconds: 0, label: k % 2 === 0 ? 'gull' : 'buoy' }));
  return { sampleRateHz: fs, channelNames: names, data, events };
}

const recipe = {
  format: 2,
  epochs: { events: ['gull', 'buoy'], start: -0.4, end: 1.1 },
  frequencies: { min: 4, max: 40, count: 8, spacing: 'log' },
  cycles: { min: 3, max: 6 },
  baseline: { start: -0.35, end: -0.15, method: 'decibel', scope: 'average' },
  spectrum: { segment: 1, overlap: 0.5, range: [1, 45], source: 'epochs' },
  aperiodic: { range: [2, 40], model: 'power-law' },
};

describe('summarizeRecording (the session summary, channel by channel in workers)', () => {
  it('gives exactly what buildSummary gives over a run kept in memory, and the upload schema accepts it', async () => {
    const input = makeRecording();
    const progress: number[] = [];
    const { summary } = await summarizeRecording(input, recipe, { size: 2, createWorker: createNodeDecomposeWorker, onProgress: (done) => progress.push(done) });
    const { plan, recording } = planRun(input, recipe);
    const channels = plan.channels.map((_, i) => analyzeChannel(plan, recording.data[plan.channelIndices[i]], { singleTrials: true }));
    expect(JSON.stringify(summary)).toBe(JSON.stringify(buildSummary(plan, channels).summary));
    expect(progress.slice().sort()).toEqual([1, 2, 3, 4]);
    expect(SummaryInput.safeParse(summary).success).toBe(true);
  }, 60_000);
});
