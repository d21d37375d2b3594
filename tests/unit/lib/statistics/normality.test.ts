import { describe, expect, it } from 'vitest';
import { assertClose } from '../../../helpers/assert-close';
import { seededNormal, seededUniform } from '../../../helpers/seeded-random';
import { dagostinoPearson, kurtosis, skewness } from '../../../../src/lib/statistics/normality';
import reference from './reference.json';

function exponential(n: number, seed: number): Float64Array {
  const u = seededUniform(seed);
  return Float64Array.from({ length: n }, () => -Math.log(1 - u()));
}

function normal(n: number, seed: number): Float64Array {
  const z = seededNormal(seed);
  return Float64Array.from({ length: n }, () => z());
}

describe('skewness and the D\'Agostino–Pearson K² test', () => {
  // The exponential distribution has skewness 2 and kurtosis 9; the normal 0 and 3 (common practice).
  it('skewness of 200,000 exponential values is 2 ± 0.1 and of 200,000 normal values 0 ± 0.02', () => {
    const e = exponential(200_000, 11);
    const z = normal(200_000, 12);
    assertClose(skewness(e), 2, 0.1, 'exponential');
    assertClose(skewness(z), 0, 0.02, 'normal');
    assertClose(kurtosis(z), 3, 0.05, 'normal kurtosis');
  });

  it('K² rejects an exponential sample of 200 (p < 1e-6) and keeps a normal one (p > 0.05)', () => {
    const e = dagostinoPearson(exponential(200, 21));
    const z = dagostinoPearson(normal(200, 22));
    console.log(`K² exponential: ${e.k2.toFixed(1)} (p = ${e.p.toExponential(2)}); normal: ${z.k2.toFixed(2)} (p = ${z.p.toFixed(3)})`);
    expect(e.p).toBeLessThan(1e-6);
    expect(z.p).toBeGreaterThan(0.05);
    expect(z.reliable).toBe(true);
  });

  // Under normality K² is about χ²₂, so about 5 % of normal samples are rejected at 0.05 (D'Agostino et al., 1990).
  it('rejects between 1 and 12 of 100 seeded normal samples of 50 at the 0.05 level', () => {
    let rejected = 0;
    for (let seed = 100; seed < 200; seed++) if (dagostinoPearson(normal(50, seed)).p < 0.05) rejected++;
    console.log(`K² rejected ${rejected} of 100 normal samples (n = 50) at 0.05`);
    expect(rejected).toBeGreaterThanOrEqual(1);
    expect(rejected).toBeLessThanOrEqual(12);
  });

  // SciPy 1.17.1 stats.skew, kurtosis(fisher=False), skewtest, kurtosistest and normaltest on the 44 values of
  // Potthoff & Roy's girls (reference.py).
  it('matches SciPy\'s skewtest, kurtosistest and normaltest on Potthoff & Roy\'s 44 girls\' distances', () => {
    const g = reference.k2.girls;
    const r = dagostinoPearson(g.x);
    for (const k of ['skewness', 'kurtosis', 'zSkewness', 'zKurtosis', 'k2', 'p'] as const) assertClose(r[k], g[k], 1e-10, k);
  });

  it('flags n < 20 as approximate and refuses n < 8 and constant samples', () => {
    expect(dagostinoPearson(normal(12, 3)).reliable).toBe(false);
    expect(() => dagostinoPearson([1, 2, 3, 4, 5, 6, 7])).toThrow(/at least 8 values/);
    expect(() => dagostinoPearson(new Array(10).fill(2))).toThrow(/constant/);
  });
});
