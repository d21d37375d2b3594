import { describe, expect, it } from 'vitest';
import fc from 'fast-check';
import { benjaminiHochberg, countDiscoveries } from '../../../../src/lib/statistics/fdr';

// Benjamini & Hochberg (1995, J R Stat Soc B 57:289–300), section 4: the 15 p values of the myocardial-infarction
// example; at q = 0.05 the procedure rejects the four smallest (the p values are from memory of the paper).
const PAPER = [0.0001, 0.0004, 0.0019, 0.0095, 0.0201, 0.0278, 0.0298, 0.0344, 0.0459, 0.324, 0.4262, 0.5719, 0.6528, 0.759, 1.0];

describe('Benjamini–Hochberg', () => {
  it('finds 4 discoveries among the 1995 paper\'s 15 p values at q = 0.05', () => {
    const q = benjaminiHochberg(PAPER);
    expect(countDiscoveries(q, 0.05)).toBe(4);
    expect(Array.from(q.slice(0, 4)).every((v) => v <= 0.05)).toBe(true);
    // p_(4)·15/4 = 0.035625; p_(5)·15/5 = 0.0603 and every later bound is larger, so the fifth is not one.
    expect(q[3]).toBeCloseTo(0.035625, 12);
    expect(q[4]).toBeCloseTo(0.0603, 12);
  });

  it('does not depend on the order of the p values, and leaves NaN out of M', () => {
    const shuffled = [...PAPER].reverse();
    const q = benjaminiHochberg(shuffled);
    expect(Array.from(q).reverse()).toEqual(Array.from(benjaminiHochberg(PAPER)));
    const withNaN = benjaminiHochberg([NaN, ...PAPER]);
    expect(withNaN[0]).toBeNaN();
    expect(Array.from(withNaN.slice(1))).toEqual(Array.from(benjaminiHochberg(PAPER)));
  });

  // Definition (statistics contract): q_(i) = min_{j ≥ i} p_(j)·M/j, capped at 1 — checked by the O(M²) formula.
  it('equals the definition min over j ≥ i of p_(j)·M/j, capped at 1, and q ≥ p', () => {
    fc.assert(
      fc.property(fc.array(fc.double({ min: 0, max: 1, noNaN: true }), { minLength: 1, maxLength: 40 }), (p) => {
        const q = benjaminiHochberg(p);
        const sorted = [...p].sort((a, b) => a - b);
        const m = p.length;
        for (let i = 0; i < m; i++) {
          const rank = sorted.indexOf(p[i]); // ties share the smallest rank; the min over j ≥ rank is the same
          let best = Infinity;
          for (let j = rank; j < m; j++) best = Math.min(best, (sorted[j] * m) / (j + 1));
          expect(q[i]).toBeCloseTo(Math.min(1, best), 14);
          expect(q[i]).toBeGreaterThanOrEqual(p[i] * (1 - 1e-12)); // p·M/j rounds, even for j = M
        }
      }),
    );
  });
});
