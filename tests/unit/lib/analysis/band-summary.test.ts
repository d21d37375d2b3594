import { describe, expect, it } from 'vitest';
import { bandProblem, bandWindowMean, summarizeBands, windowProblem } from '../../../../src/lib/analysis/band-summary';

// Hand-worked: a 3 × 4 map whose value is 10·f + t (f, t the grid indices), so each mean is checkable by hand.
const frequencies = [4, 8, 12];
const times = [-0.1, 0, 0.1, 0.2];
const values = Float64Array.from({ length: 12 }, (_, i) => 10 * Math.floor(i / 4) + (i % 4));

describe('bandWindowMean', () => {
  it('averages the cells inside the band and window, both ends inclusive', () => {
    // f in [4, 8] → rows 0, 1; t in [0, 0.1] → columns 1, 2: values 1, 2, 11, 12 → mean 6.5.
    expect(bandWindowMean(values, frequencies, times, null, 4, 8, 0, 0.1)).toEqual({ mean: 6.5, cells: 4 });
  });
  it('leaves masked (edge-zone) cells out', () => {
    const mask = new Uint8Array(12);
    mask[1] = 1; // row 0, t = 0
    expect(bandWindowMean(values, frequencies, times, mask, 4, 8, 0, 0.1)).toEqual({ mean: (2 + 11 + 12) / 3, cells: 3 });
  });
  it('gives NaN and 0 cells when the band holds no grid frequency', () => {
    const r = bandWindowMean(values, frequencies, times, null, 30, 45, 0, 0.1);
    expect(r.cells).toBe(0);
    expect(Number.isNaN(r.mean)).toBe(true);
  });
});

describe('summarizeBands', () => {
  // Hand-worked with the decibel's definition (common practice): 10·log10(P / B). Power 4 µV² at the baseline
  // points (t = −0.1, 0) and 40 µV² after them gives 10·log10(10) = 10 dB exactly, 0 dB in the baseline.
  const power = Float64Array.from({ length: 12 }, (_, i) => (i % 4 < 2 ? 4 : 40));
  const input = { channels: ['Cz'], labels: ['bell'], power: [[power]], frequencies: Float64Array.from(frequencies), times: Float64Array.from(times), mask: null };
  const bands = [{ name: 'low', lowHz: 4, highHz: 8 }];
  const windows = [
    { name: 'before', startSeconds: -0.1, endSeconds: 0 },
    { name: 'after', startSeconds: 0.1, endSeconds: 0.2 },
  ];

  it('normalizes each map to the baseline points, then averages each band × window', () => {
    const rows = summarizeBands(input, { first: 0, last: 1 }, 'decibel', bands, windows);
    expect(rows.map((r) => [r.channel, r.condition, r.band.name, r.window.name, r.cells])).toEqual([
      ['Cz', 'bell', 'low', 'before', 4],
      ['Cz', 'bell', 'low', 'after', 4],
    ]);
    expect(rows[0].value).toBeCloseTo(0, 12);
    expect(rows[1].value).toBeCloseTo(10, 12);
    // Percent change of the same map: (40 − 4) / 4 · 100 = 900 %.
    expect(summarizeBands(input, { first: 0, last: 1 }, 'percent-change', bands, windows)[1].value).toBeCloseTo(900, 9);
  });

  it('says why a band or window cannot be summarized', () => {
    expect(bandProblem({ name: 'gamma', lowHz: 30, highHz: 45 }, frequencies)).toBe('gamma: 30–45 Hz holds no frequency of the grid (4.0–12.0 Hz)');
    expect(bandProblem({ name: 'odd', lowHz: 8, highHz: 4 }, frequencies)).toMatch(/^odd: the low edge/);
    expect(windowProblem({ name: 'late', startSeconds: 1, endSeconds: 2 }, times)).toBe('late: lies outside the epoch (-0.1 to 0.200 s)');
    expect(bandProblem(bands[0], frequencies)).toBeNull();
  });
});
