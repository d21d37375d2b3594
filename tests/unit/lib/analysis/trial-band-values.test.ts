import { describe, expect, it } from 'vitest';
import { trialBandValues } from '../../../../src/lib/analysis/trial-band-values';

describe('trialBandValues', () => {
  it('normalizes each trial by its own baseline, then averages the band × window cells (worked by hand)', () => {
    // 2 trials × 2 frequencies (4, 10 Hz) × 4 times (−0.2, −0.1, 0, 0.1 s); baseline = the first two points.
    // Trial 1 at 4 Hz: 1 3 | 4 6 → B = 2, power ratio 2 and 3; trial 2 at 4 Hz: 2 2 | 1 5 → B = 2, ratios 0.5, 2.5.
    const trials = Float32Array.from([1, 3, 4, 6, /* 10 Hz */ 9, 9, 9, 9, /* trial 2 */ 2, 2, 1, 5, /* 10 Hz */ 9, 9, 9, 9]);
    const [cell] = trialBandValues(trials, 2, [4, 10], [-0.2, -0.1, 0, 0.1], null, 0, 1, 'power-ratio', [{ lowHz: 3, highHz: 5, startSeconds: 0, endSeconds: 0.1 }]);
    expect(Array.from(cell)).toEqual([2.5, 1.5]);
    // Percent change of the same: 100·(ratio − 1), averaged: trial 1 (100 + 200)/2, trial 2 (−50 + 150)/2.
    const [pc] = trialBandValues(trials, 2, [4, 10], [-0.2, -0.1, 0, 0.1], null, 0, 1, 'percent-change', [{ lowHz: 3, highHz: 5, startSeconds: 0, endSeconds: 0.1 }]);
    expect(Array.from(pc)).toEqual([150, 50]);
  });

  it('leaves masked (edge-zone) cells out and gives NaN for a band without a grid frequency', () => {
    const trials = Float32Array.from([1, 3, 4, 6, 9, 9, 9, 9]);
    const mask = Uint8Array.from([0, 0, 0, 1, 0, 0, 0, 0]);
    const [cell, empty] = trialBandValues(trials, 1, [4, 10], [-0.2, -0.1, 0, 0.1], mask, 0, 1, 'power-ratio', [
      { lowHz: 3, highHz: 5, startSeconds: 0, endSeconds: 0.1 },
      { lowHz: 20, highHz: 30, startSeconds: 0, endSeconds: 0.1 },
    ]);
    expect(cell[0]).toBe(2);
    expect(Number.isNaN(empty[0])).toBe(true);
  });
});
