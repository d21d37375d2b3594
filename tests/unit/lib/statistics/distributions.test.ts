import { describe, expect, it } from 'vitest';
import { assertClose } from '../../../helpers/assert-close';
import {
  chiSquareUpperP,
  fCdf,
  fQuantile,
  fUpperP,
  studentTCdf,
  studentTQuantile,
  studentTTwoSidedP,
} from '../../../../src/lib/statistics/distributions';
import reference from './reference.json';

describe('Student t and F from jstat', () => {
  // NIST/SEMATECH e-Handbook of Statistical Methods, 1.3.6.7.2 "Critical values of the Student's t distribution"
  // (three decimals as printed).
  it('t(0.975; 9) = 2.262 and t(0.975; 29) = 2.045 as in the NIST table', () => {
    expect(studentTQuantile(0.975, 9).toFixed(3)).toBe('2.262');
    expect(studentTQuantile(0.975, 29).toFixed(3)).toBe('2.045');
  });

  // NIST/SEMATECH e-Handbook, 1.3.6.7.3 "Upper critical values of the F distribution" (ν1 = 2, ν2 = 20, α = 0.05).
  it('F(0.95; 2, 20) = 3.49 as in the NIST table', () => {
    expect(fQuantile(0.95, 2, 20).toFixed(2)).toBe('3.49');
  });

  // SciPy 1.17.1 stats.t.ppf / stats.f.ppf (tests/unit/lib/statistics/reference.py).
  it('quantiles agree with SciPy to 1e-7 relative', () => {
    for (const [p, df, q] of reference.quantiles.t) assertClose(studentTQuantile(p, df), q, 1e-7 * Math.abs(q), `t(${p}; ${df})`);
    for (const [p, d1, d2, q] of reference.quantiles.f) assertClose(fQuantile(p, d1, d2), q, 1e-7 * q, `F(${p}; ${d1}, ${d2})`);
  });

  // SciPy 2·t.sf(|t|) and f.sf (jstat's continued fraction stops near 1e-8 relative); tails come from the incomplete beta function, so tiny p keep their precision.
  it('tail probabilities agree with SciPy to 1e-7 relative, tiny ones included', () => {
    for (const [t, df, p] of reference.quantiles.tTail) assertClose(studentTTwoSidedP(t, df), p, 1e-7 * p, `t=${t}, df=${df}`);
    for (const [f, d1, d2, p] of reference.quantiles.fTail) assertClose(fUpperP(f, d1, d2), p, 1e-7 * p, `F=${f} (${d1}, ${d2})`);
  });

  it('CDFs are the complements of the upper tails and quantiles invert them', () => {
    assertClose(studentTCdf(studentTQuantile(0.9, 7), 7), 0.9, 1e-9);
    assertClose(studentTCdf(-1.5, 7) + studentTCdf(1.5, 7), 1, 1e-15);
    assertClose(fCdf(fQuantile(0.95, 3, 12), 3, 12), 0.95, 1e-9);
    expect(studentTTwoSidedP(0, 5)).toBe(1);
    expect(studentTTwoSidedP(Infinity, 5)).toBe(0);
    expect(studentTTwoSidedP(NaN, 5)).toBeNaN();
  });

  // χ² with 2 degrees of freedom has the closed form P(X ≥ x) = exp(−x/2) (common practice).
  it('χ²₂ upper tail is exp(−x/2)', () => {
    for (const x of [0.1, 1, 5.991, 20]) assertClose(chiSquareUpperP(x, 2), Math.exp(-x / 2), 1e-12);
  });
});
