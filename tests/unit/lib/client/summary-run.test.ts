import { describe, expect, it } from 'vitest';
import { analyzeChannel, planRun } from '../../../../src/lib/analysis/run-recipe';
import type { Recording } from '../../../../src/lib/analysis/recording';
import { buildSummary, resolveSummarySpec, SUMMARY_LIMITS } from '../../../../src/lib/analysis/summary';
import { SummaryInput } from '../../../../src/lib/schemas/review';
import { fittedSpec, summarizeRecording } from '../../../../src/lib/client/summary-run';
import { createNodeDecomposeWorker } from '../../../../workers/node-worker-factory';
import { seededNormal } from '../../../helpers/seeded-random';

// Scenario of our own: four channels at 128 Hz, "gull" and "buoy" cues in turn every 1.5 s (24 of them: 40 s).
function makeRecording(cues = 24): Recording {
  const fs = 128;
  const normal = seededNormal(29);
  const names = ['Fz', 'Cz', 'Pz', 'Oz'];
  const data = names.map(() => Float32Array.from({ length: Math.ceil(1.5 * cues + 4) * fs }, () => 4 * normal()));
  const events = Array.from({ length: cues }, (_, k) => ({ onsetSeconds: 1 + 1.5 * k, durationSeconds: 0, label: k % 2 === 0 ? 'gull' : 'buoy' }));
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

  it('ends with the worker’s failure when a worker fails outside any answer, and ends every worker', async () => {
    // A worker whose script "did not load": its port never answers, and it reports the failure as a Web Worker would.
    const ended: number[] = [];
    const broken = (k: number) => {
      const { port1 } = new MessageChannel();
      return {
        endpoint: port1,
        terminate: () => {
          ended.push(k);
          port1.close();
        },
        onFailure: (listener: (problem: string) => void) => setTimeout(() => listener('its script did not load'), 10),
      };
    };
    let k = 0;
    await expect(summarizeRecording(makeRecording(), recipe, { size: 2, createWorker: () => broken(k++) })).rejects.toThrow('the summary worker failed: its script did not load');
    expect(ended.sort()).toEqual([0, 1]);
  }, 60_000);

  it('keeps per-trial values for as many channels as the caps allow when all would pass them, and says so', () => {
    // 60 cues: 16 bands (one around each grid frequency) × 16 windows × 60 trials = 15 360 values per channel, so
    // all four channels (61 440) pass the cap of 50 000 and three (46 080) fit.
    const input = makeRecording(60);
    const { plan } = planRun(input, { ...recipe, frequencies: { min: 4, max: 40, count: 16, spacing: 'log' } });
    const bands = Array.from(plan.frequencies, (f, i) => ({ label: `b${i}`, lowHz: f * 0.97, highHz: f * 1.03 }));
    const windows = Array.from({ length: 16 }, (_, k) => ({ label: `w${k}`, startS: 0.05 * k, endS: 0.05 * k + 0.05 }));
    expect(SUMMARY_LIMITS.trialValuesTotal).toBe(50_000);
    expect(() => resolveSummarySpec(plan, { bands, windows })).toThrow(/^summary\.trialValues would hold 61440 per-trial values/);
    const fitted = fittedSpec(plan, { bands, windows });
    expect([...fitted.trialChannels]).toEqual(['Fz', 'Cz', 'Pz']);
    expect(fitted.notices.at(-1)).toBe("summary: per-trial values kept for the first 3 of 4 channels (Fz, Cz, Pz); more would pass the summary's cap of 50000 values");
    // a spec that names its own trial channels is the person's choice: left as it is
    expect([...fittedSpec(plan, { bands, windows, trialChannels: ['Oz'] }).trialChannels]).toEqual(['Oz']);
    // the default spec fits every channel: nothing changes
    expect([...fittedSpec(plan, {}).trialChannels]).toEqual(plan.channels);
  });
});
