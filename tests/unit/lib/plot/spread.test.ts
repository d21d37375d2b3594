import { describe, expect, it } from 'vitest';
import fc from 'fast-check';
import { epochSpread, quantileSorted } from '../../../../src/lib/plot/spread';
import { assertClose } from '../../../helpers/assert-close';

// Expected values from NumPy 2.4.6, `numpy.percentile(x, [10, 90, 50, 25])` (its default "linear" method is
// definition 7 of Hyndman & Fan, 1996), run once on this machine and copied here.
describe('quantileSorted', () => {
  it('matches numpy.percentile (linear) on eight values', () => {
    const sorted = Float64Array.from([3.2, 1.5, 7.7, 2.0, 9.1, 4.4, 6.0, 0.3]).sort();
    assertClose([0.1, 0.9, 0.5, 0.25].map((p) => quantileSorted(sorted, p)), [1.14, 8.12, 3.8, 1.875], 1e-12);
  });
  it('matches numpy.percentile on one and two values, and gives NaN for none', () => {
    assertClose([quantileSorted([5], 0.1), quantileSorted([5], 0.9)], [5, 5], 0);
    assertClose([quantileSorted([1, 2], 0.1), quantileSorted([1, 2], 0.9)], [1.1, 1.9], 1e-12);
    expect(quantileSorted([], 0.5)).toBeNaN();
  });
  it('stays between the smallest and largest value and never decreases with p (fast-check)', () => {
    fc.assert(
      fc.property(fc.array(fc.double({ min: -1e6, max: 1e6, noNaN: true }), { minLength: 1, maxLength: 40 }), fc.double({ min: 0, max: 1, noNaN: true }), fc.double({ min: 0, max: 1, noNaN: true }), (xs, p, q) => {
        const s = Float64Array.from(xs).sort();
        const [a, b] = p <= q ? [p, q] : [q, p];
        const qa = quantileSorted(s, a);
        expect(qa).toBeGreaterThanOrEqual(s[0]);
        expect(quantileSorted(s, b)).toBeLessThanOrEqual(s[s.length - 1]);
        expect(quantileSorted(s, b)).toBeGreaterThanOrEqual(qa - 1e-9 * Math.max(1, Math.abs(qa)));
      }),
    );
  });
});

describe('epochSpread', () => {
  it('takes the 10th and 90th percentile across epochs per bin, leaving out non-finite values', () => {
    // Three epochs × two bins; bin 1 of epoch 2 has no value.
    const perTrial = Float64Array.from([1, 10, 2, 20, 3, NaN]);
    const { low, high } = epochSpread(perTrial, 3, 2);
    // numpy.percentile([1, 2, 3], [10, 90]) = [1.2, 2.8]; numpy.percentile([10, 20], [10, 90]) = [11, 19].
    assertClose(low, [1.2, 11], 1e-12);
    assertClose(high, [2.8, 19], 1e-12);
  });
});
