import { describe, expect, it } from 'vitest';
import { envelope, robustRange } from '../../../../src/components/source/overview-draw';

describe('envelope', () => {
  it('keeps the min and max of each of the equal slices', () => {
    // By hand: 8 samples in 4 columns of 2 → (1, 5), (−2, 0), (7, 7), (3, 4).
    const env = envelope(Float32Array.from([1, 5, 0, -2, 7, 7, 4, 3]), 4);
    expect([...env.mins]).toEqual([1, -2, 7, 3]);
    expect([...env.maxs]).toEqual([5, 0, 7, 4]);
  });

  it('never loses a spike however hard it decimates', () => {
    const x = new Float32Array(10_000);
    x[6_789] = 400;
    const env = envelope(x, 37);
    expect(Math.max(...env.maxs)).toBe(400);
  });
});

describe('robustRange', () => {
  it('ignores the top 2 % of column maxima, so one artifact does not flatten the trace', () => {
    // 100 columns of ±10 and one of +400: the 98th percentile of the maxima is still 10.
    const mins = new Float32Array(100).fill(-10);
    const maxs = new Float32Array(100).fill(10);
    maxs[50] = 400;
    expect(robustRange({ mins, maxs })).toEqual([-10, 10]);
  });
});
