import { describe, expect, it } from 'vitest';
import { assertClose } from '../../../helpers/assert-close';
import { repeatedMeasuresAnova, type RmEffect } from '../../../../src/lib/statistics/rm-anova';
import reference from './reference.json';

function expectEffect(actual: RmEffect, expected: Omit<RmEffect, 'effect'>, label: string) {
  expect(actual.df1).toBe(expected.df1);
  expect(actual.df2).toBe(expected.df2);
  for (const k of ['F', 'eta2p', 'epsilon', 'ss', 'ssError'] as const) {
    assertClose(actual[k], expected[k], 1e-10 * Math.max(1, Math.abs(expected[k])), `${label} ${k}`);
  }
  for (const k of ['p', 'pGG'] as const) assertClose(actual[k], expected[k], 1e-7 * expected[k], `${label} ${k}`); // jstat vs SciPy, see distributions.test.ts
}

describe('repeated-measures ANOVA', () => {
  // Potthoff & Roy (1964, Biometrika 51:313–326): the 11 girls' distances at ages 8, 10, 12 and 14 (the data as
  // published; from memory of the table). No printed ANOVA goes with them, so the reference is SciPy/NumPy by the
  // classical sums of squares and Greenhouse & Geisser's (1959) double-centred covariance formula (reference.py),
  // an independent route from our orthonormal contrasts.
  it('one factor (age, 4 levels, 11 girls) matches the classical computation: F, df, p, η²p, ε and pGG', () => {
    const values = reference.girls.values.flat();
    const r = repeatedMeasuresAnova({ factors: [{ name: 'age', levels: 4 }], nSubjects: 11, values });
    expect(r.n).toBe(11);
    expect(r.effects.map((e) => e.effect)).toEqual(['age']);
    expectEffect(r.effects[0], reference.girls.age, 'age');
    expect(r.effects[0].F.toFixed(2)).toBe('26.10');
  });

  // Graziano & Raulin, Research Methods, 9th ed., companion tutorial "Computational Procedures for a Repeated-Measures
  // ANOVA" (graziano-raulin.com/tutorials/stat_comp/manrman.htm): 6 participants × 3 conditions. The page prints the
  // condition means 10.83, 9.00, 8.17 (G = 168, ΣX² = 1600); its computational formulas give, by hand,
  // SS_between = ΣT²/n − G²/N = 9542/6 − 1568 = 67/3, SS_subjects = ΣP²/k − G²/N = 4, SS_error = 32 − 67/3 − 4 = 17/3,
  // F(2, 10) = (67/6)/(17/30) = 335/17 ≈ 19.71; p = 0.000339506564985 from SciPy 1.17.1
  // (python3 -c "from scipy import stats; print(stats.f.sf(335/17, 2, 10))").
  it('reproduces the hand computation of Graziano & Raulin\'s six participants × three conditions', () => {
    const data = [
      [10, 8, 8],
      [12, 9, 8],
      [11, 10, 9],
      [11, 10, 8],
      [10, 8, 9],
      [11, 9, 7],
    ];
    const means = [0, 1, 2].map((j) => data.reduce((a, row) => a + row[j], 0) / 6);
    expect(means.map((m) => m.toFixed(2))).toEqual(['10.83', '9.00', '8.17']);
    const e = repeatedMeasuresAnova({ factors: [{ name: 'condition', levels: 3 }], nSubjects: 6, values: data.flat() }).effects[0];
    assertClose(e.ss, 67 / 3, 1e-12, 'SS between');
    assertClose(e.ssError, 17 / 3, 1e-12, 'SS error');
    expect([e.df1, e.df2]).toEqual([2, 10]);
    assertClose(e.F, 335 / 17, 1e-11, 'F');
    expect(e.F.toFixed(2)).toBe('19.71');
    assertClose(e.p, 0.00033950656498517057, 1e-7 * 0.00034, 'p');
    assertClose(e.eta2p, 67 / 3 / (67 / 3 + 17 / 3), 1e-12, 'partial eta squared');
  });

  // Two within factors (3 × 4) on seeded data with unequal variances: SciPy/NumPy classical sums of squares over
  // marginal means and ε from eigenvalues in a scipy.linalg.null_space basis (reference.py).
  it('two factors give both main effects and the interaction as the classical computation does', () => {
    const { values, levels, effects } = reference.twoWay;
    const r = repeatedMeasuresAnova({
      factors: [
        { name: 'condition', levels: levels[0] },
        { name: 'band', levels: levels[1] },
      ],
      nSubjects: values.length,
      values: values.flat(),
    });
    expect(r.effects.map((e) => e.effect)).toEqual(['condition', 'band', 'condition:band']);
    expectEffect(r.effects[0], effects.A, 'condition');
    expectEffect(r.effects[1], effects.B, 'band');
    expectEffect(r.effects[2], effects.AB, 'condition:band');
  });

  it('ε is exactly 1 for a one-degree-of-freedom effect, and F equals the paired t squared', () => {
    // Common practice: with two levels the repeated-measures F is the square of the paired t.
    const { drug1, drug2 } = reference.sleep;
    const values = drug1.flatMap((v, i) => [drug2[i], v]);
    const r = repeatedMeasuresAnova({ factors: [{ name: 'drug', levels: 2 }], nSubjects: 10, values });
    expect(r.effects[0].epsilon).toBe(1);
    assertClose(r.effects[0].F, reference.sleep.paired.t ** 2, 1e-10);
    assertClose(r.effects[0].p, reference.sleep.paired.p, 1e-7 * reference.sleep.paired.p);
    expect(r.effects[0].pGG).toBe(r.effects[0].p);
  });

  it('ε lies between 1/df1 and 1 (Greenhouse & Geisser, 1959, lower bound)', () => {
    const r = repeatedMeasuresAnova({ factors: [{ name: 'age', levels: 4 }], nSubjects: 11, values: reference.girls.values.flat() });
    const { epsilon, df1 } = r.effects[0];
    expect(epsilon).toBeGreaterThanOrEqual(1 / df1);
    expect(epsilon).toBeLessThanOrEqual(1);
  });

  it('refuses a factor with one level, a missing cell and a single subject, naming them', () => {
    expect(() => repeatedMeasuresAnova({ factors: [{ name: 'band', levels: 1 }], nSubjects: 3, values: [1, 2, 3] })).toThrow(
      /factors\[0\] \("band"\) needs at least 2 levels/,
    );
    expect(() => repeatedMeasuresAnova({ factors: [{ name: 'band', levels: 2 }], nSubjects: 3, values: [1, 2, 3, 4, 5] })).toThrow(
      /values has 5 entries; 3 subjects × 2 cells need 6/,
    );
    expect(() => repeatedMeasuresAnova({ factors: [{ name: 'band', levels: 2 }], nSubjects: 1, values: [1, 2] })).toThrow(/at least 2 complete subjects/);
  });
});
