// Identities between the tests that hold for any data (common practice; e.g. Maxwell & Delaney, 2004, ch. 11):
// checked with fast-check on random samples, beside the reference values of the other files.
import fc from 'fast-check';
import { describe, expect, it } from 'vitest';
import { linearRegression } from '../../../../src/lib/statistics/regression';
import { repeatedMeasuresAnova } from '../../../../src/lib/statistics/rm-anova';
import { oneSampleTest, pairedTest } from '../../../../src/lib/statistics/t-tests';

// Hundredths in ±100: the range of normalized values, without subnormals that make a spread underflow to 0.
const value = fc.integer({ min: -10_000, max: 10_000 }).map((v) => v / 100);
const close = (a: number, b: number, rel = 1e-9) => Math.abs(a - b) <= rel * Math.max(1, Math.abs(a), Math.abs(b));

describe('identities between the tests', () => {
  it('a paired test is the one-sample test of the differences', () => {
    fc.assert(
      fc.property(fc.array(fc.tuple(value, value), { minLength: 2, maxLength: 30 }), (pairs) => {
        const a = pairs.map((p) => p[0]);
        const b = pairs.map((p) => p[1]);
        const d = pairs.map((p) => p[0] - p[1]);
        const r = pairedTest(a, b);
        const o = oneSampleTest(d);
        expect(r.t).toBe(o.t);
        expect(r.ci95).toEqual(o.ci95);
      }),
    );
  });

  it('the 95 % CI excludes the neutral value exactly when p < 0.05', () => {
    fc.assert(
      fc.property(fc.array(value, { minLength: 3, maxLength: 30 }), (x) => {
        const r = oneSampleTest(x);
        fc.pre(r.sd > 1e-6 && Math.abs(r.p - 0.05) > 1e-6);
        expect(r.ci95[0] > 0 || r.ci95[1] < 0).toBe(r.p < 0.05);
      }),
    );
  });

  it('regression: t = r·√(df/(1 − r²)), and the slope of y on x times the slope of x on y is r²', () => {
    fc.assert(
      fc.property(fc.array(fc.tuple(value, value), { minLength: 3, maxLength: 30 }), (pts) => {
        const x = pts.map((p) => p[0]);
        const y = pts.map((p) => p[1]);
        fc.pre(new Set(x).size > 1 && new Set(y).size > 1);
        const yx = linearRegression(x, y);
        const xy = linearRegression(y, x);
        fc.pre(Math.abs(yx.r) < 0.999999);
        expect(close(yx.t, yx.r * Math.sqrt(yx.df / (1 - yx.r * yx.r)), 1e-6)).toBe(true);
        expect(close(yx.slope * xy.slope, yx.r * yx.r, 1e-9)).toBe(true);
        expect(close(yx.p, xy.p, 1e-6)).toBe(true);
      }),
    );
  });

  it('a two-level repeated-measures F is the paired t squared, with the same p, and ε = 1', () => {
    fc.assert(
      fc.property(fc.array(fc.tuple(value, value), { minLength: 3, maxLength: 20 }), (pairs) => {
        const t = pairedTest(pairs.map((p) => p[0]), pairs.map((p) => p[1]));
        fc.pre(t.sd > 1e-6);
        const e = repeatedMeasuresAnova({ factors: [{ name: 'c', levels: 2 }], nSubjects: pairs.length, values: pairs.flat() }).effects[0];
        expect(close(e.F, t.t * t.t, 1e-8)).toBe(true);
        expect(close(e.p, t.p, 1e-6)).toBe(true);
        expect(e.epsilon).toBe(1);
      }),
    );
  });

  it('ANOVA: adding a constant per subject changes nothing; ε stays within [1/df1, 1]', () => {
    fc.assert(
      fc.property(
        fc.integer({ min: 3, max: 8 }),
        fc.integer({ min: 3, max: 5 }),
        fc.array(value, { minLength: 40, maxLength: 40 }),
        fc.array(value, { minLength: 8, maxLength: 8 }),
        (n, k, pool, shift) => {
          const values = Array.from({ length: n * k }, (_, i) => pool[i % pool.length] + 0.01 * i * i);
          const shifted = values.map((v, i) => v + shift[Math.floor(i / k)]);
          const a = repeatedMeasuresAnova({ factors: [{ name: 'c', levels: k }], nSubjects: n, values }).effects[0];
          const b = repeatedMeasuresAnova({ factors: [{ name: 'c', levels: k }], nSubjects: n, values: shifted }).effects[0];
          fc.pre(a.ssError > 1e-6);
          expect(close(a.F, b.F, 1e-6)).toBe(true);
          expect(a.epsilon).toBeGreaterThanOrEqual(1 / a.df1 - 1e-12);
          expect(a.epsilon).toBeLessThanOrEqual(1 + 1e-12);
        },
      ),
    );
  });
});
