import { describe, expect, it } from 'vitest';
import { bandWindowMean } from '../../../../src/lib/analysis/band-summary';

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
