// Keeping one channel's single trials (the explorer's trial view) must not change that channel's trial average:
// the browser asks for them, the command line never does, and the contract wants the same bits on both.
import { describe, expect, it } from 'vitest';
import { analyzeChannel, planRecipe } from '../../../../src/lib/analysis/run-recipe';
import type { Recording } from '../../../../src/lib/analysis/recording';
import { seededNormal } from '../../../helpers/seeded-random';

// Scenario of our own: one channel at 200 Hz, 40 s, a "chime" cue every 1.6 s.
function recording(): Recording {
  const normal = seededNormal(5);
  const data = [Float32Array.from({ length: 40 * 200 }, () => 5 * normal())];
  const events = Array.from({ length: 22 }, (_, k) => ({ onsetSeconds: 2 + 1.6 * k, durationSeconds: 0, label: 'chime' }));
  return { sampleRateHz: 200, channelNames: ['Oz'], data, events };
}

describe('single trials kept or not', () => {
  it('gives the same trial-averaged power and normalized maps to the last bit, and rows that average to it', () => {
    const rec = recording();
    for (const method of ['decibel', 'z-score'] as const) {
      const plan = planRecipe(rec, {
        format: 2,
        epochs: { events: ['chime'], start: -0.5, end: 1.0 },
        frequencies: { min: 4, max: 60, count: 9, spacing: 'log' },
        cycles: { min: 3, max: 9 },
        baseline: { start: -0.4, end: -0.1, method, scope: 'average' },
        spectrum: { segment: 1, overlap: 0.5, range: [1, 80], source: 'recording' },
        aperiodic: { range: [2, 60], model: 'power-law' },
      });
      const without = analyzeChannel(plan, rec.data[0]);
      const kept = analyzeChannel(plan, rec.data[0], { singleTrials: true });
      expect(Array.from(kept.power[0])).toEqual(Array.from(without.power[0]));
      expect(Array.from(kept.normalized[0])).toEqual(Array.from(without.normalized[0]));
      // Keeping the coarse samples too (the explorer's live re-normalization) changes nothing either.
      const withCoarse = analyzeChannel(plan, rec.data[0], { singleTrials: true, coarseTrials: true });
      expect(withCoarse.coarseTrials).not.toBeNull();
      expect(Array.from(withCoarse.power[0])).toEqual(Array.from(without.power[0]));
      expect(Array.from(withCoarse.normalized[0])).toEqual(Array.from(without.normalized[0]));
      expect(Array.from(withCoarse.singleTrials![0])).toEqual(Array.from(kept.singleTrials![0]));
      // The rows are float32 copies of each trial's |y|²; their mean agrees with the average to float32 precision.
      const T = plan.times.length;
      const F = plan.frequencies.length;
      const n = plan.epochStarts[0].length;
      const rows = kept.singleTrials![0];
      expect(rows.length).toBe(n * F * T);
      for (const i of [0, 7 * T + 100, (F - 1) * T + T - 1]) {
        let mean = 0;
        for (let e = 0; e < n; e++) mean += rows[e * F * T + i];
        expect(Math.abs(mean / n / without.power[0][i] - 1)).toBeLessThan(1e-6);
      }
    }
  });
});
