import { describe, expect, it } from 'vitest';
import { roundHalfUp } from '../../../../src/lib/analysis/rounding';

// The contract (analysis.md, "Baseline normalization"): `round` rounds halves up. Expected values are worked by hand.
describe('roundHalfUp', () => {
  it('rounds exact halves up, including negative ones', () => {
    expect(roundHalfUp(2.5)).toBe(3);
    expect(roundHalfUp(0.5)).toBe(1);
    expect(roundHalfUp(-0.5)).toBe(0);
    expect(roundHalfUp(-1.5)).toBe(-1);
    expect(roundHalfUp(-2.6)).toBe(-3);
  });

  it('treats decimal products that binary floating point puts a hair below a half as halves', () => {
    // 1.001 s at 500 Hz is sample 500.5 on paper; in doubles it is 500.49999999999994.
    expect(1.001 * 500).toBeLessThan(500.5);
    expect(roundHalfUp(1.001 * 500)).toBe(501);
    expect(roundHalfUp(0.0025 * 200)).toBe(1);
    expect(roundHalfUp(-0.0015 * 1000)).toBe(-1);
  });

  it('rounds fractions just below a half down, however large the sample index', () => {
    // A two-hour recording at 1 kHz has sample indices near 7.2e6; onsets there must not shift by one sample.
    expect(roundHalfUp(1_000_000.4995)).toBe(1_000_000);
    expect(roundHalfUp(2_000_000.499)).toBe(2_000_000);
    expect(roundHalfUp(7_200_000.4999)).toBe(7_200_000);
    expect(roundHalfUp(7_200_000.5)).toBe(7_200_001);
  });
});
