import { describe, expect, it } from 'vitest';
import { assertClose } from '../../../helpers/assert-close';
import { oneSampleTest, pairedTest } from '../../../../src/lib/statistics/t-tests';
import { linearRegression } from '../../../../src/lib/statistics/regression';
import reference from './reference.json';

const { drug1, drug2 } = reference.sleep;

function expectSame(actual: ReturnType<typeof oneSampleTest>, expected: (typeof reference.sleep)['oneSample'], label: string) {
  expect(actual.n).toBe(expected.n);
  expect(actual.df).toBe(expected.df);
  for (const k of ['mean', 'sd', 'se', 't', 'dz'] as const) assertClose(actual[k], expected[k], 1e-12, `${label} ${k}`);
  // jstat's incomplete beta continued fraction agrees with SciPy to about 1e-8 relative
  assertClose(actual.p, expected.p, 1e-7 * expected.p, `${label} p`);
  // the CI half-width uses jstat's t quantile (relative accuracy ~1e-9)
  assertClose(actual.ci95, expected.ci95, 1e-8, `${label} ci95`);
}

describe('t-tests on Student\'s (1908) sleep data', () => {
  // Student (1908, Biometrika 6:1–25) printed, for the difference of the two drugs, mean +1.58 and standard
  // deviation 1.17 (his S.D. divides by n) — from memory of the paper; t, p and CI are cross-checked with SciPy
  // 1.17.1 stats.ttest_rel / ttest_1samp (reference.py).
  it('paired test of drug 2 − drug 1 reproduces the printed mean 1.58 and S.D. 1.17, and SciPy\'s t, p and CI', () => {
    const r = pairedTest(drug2, drug1);
    expect(r.mean.toFixed(2)).toBe('1.58');
    expect((r.sd * Math.sqrt((r.n - 1) / r.n)).toFixed(2)).toBe('1.17');
    expect(r.t.toFixed(2)).toBe('4.06');
    expectSame(r, reference.sleep.paired, 'paired');
    assertClose(r.t, reference.sleep.paired.t_ttest_rel, 1e-12);
  });

  // Student (1908) printed mean 2.33 and S.D. 1.90 (divisor n) for the second drug — from memory; rest SciPy.
  it('one-sample test of drug 2 against 0 reproduces the printed 2.33 and 1.90, and SciPy\'s t, p and CI', () => {
    const r = oneSampleTest(drug2);
    expect(r.mean.toFixed(2)).toBe('2.33');
    expect((r.sd * Math.sqrt((r.n - 1) / r.n)).toFixed(2)).toBe('1.90');
    expectSame(r, reference.sleep.oneSample, 'one-sample');
  });

  it('neutral shifts the values: a test against 1 of x equals a test against 0 of x − 1', () => {
    const shifted = oneSampleTest(drug2.map((v) => v - 1));
    const r = oneSampleTest(drug2, 1);
    assertClose(r.t, shifted.t, 1e-12);
    assertClose(r.ci95, shifted.ci95, 1e-12);
  });

  it('refuses fewer than 2 values and unequal pairs, naming them', () => {
    expect(() => oneSampleTest([1])).toThrow(/x needs at least 2 values/);
    expect(() => pairedTest([1, 2, 3], [1, 2])).toThrow(/b has 2 values but a has 3/);
  });
});

describe('least-squares regression on Anscombe\'s (1973) data set I', () => {
  // Anscombe (1973, Am Stat 27:17–21) printed for each of his four sets: regression line y = 3 + 0.5x, r = 0.82,
  // standard error of the slope 0.118 and t = 4.24 — from memory; the full digits are SciPy's linregress.
  it('gives slope 0.500, intercept 3.00, r 0.816, se 0.118, t 4.24 and SciPy\'s p', () => {
    const { x, y } = reference.anscombe;
    const r = linearRegression(x, y);
    expect(r.slope.toFixed(3)).toBe('0.500');
    expect(r.intercept.toFixed(2)).toBe('3.00');
    expect(r.r.toFixed(3)).toBe('0.816');
    expect(r.seSlope.toFixed(3)).toBe('0.118');
    expect(r.t.toFixed(2)).toBe('4.24');
    expect(r.df).toBe(9);
    for (const k of ['slope', 'intercept', 'r', 'seSlope', 't'] as const) assertClose(r[k], reference.anscombe[k], 1e-12, k);
    assertClose(r.p, reference.anscombe.p, 1e-7 * reference.anscombe.p, 'p');
  });

  it('refuses a constant covariate and fewer than 3 subjects', () => {
    expect(() => linearRegression([2, 2, 2], [1, 2, 3])).toThrow(/same for every subject/);
    expect(() => linearRegression([1, 2], [1, 2])).toThrow(/at least 3 subjects/);
  });
});
