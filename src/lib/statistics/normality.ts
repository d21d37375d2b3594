import { StatisticsInputError } from './errors';
import { chiSquareUpperP, normalCdf } from './distributions';

/** Central moments m2, m3, m4 (divisor n), summed in Float64 in index order. */
function centralMoments(x: ArrayLike<number>): { m2: number; m3: number; m4: number } {
  const n = x.length;
  let sum = 0;
  for (let i = 0; i < n; i++) sum += x[i];
  const mean = sum / n;
  let m2 = 0;
  let m3 = 0;
  let m4 = 0;
  for (let i = 0; i < n; i++) {
    const d = x[i] - mean;
    const d2 = d * d;
    m2 += d2;
    m3 += d2 * d;
    m4 += d2 * d2;
  }
  return { m2: m2 / n, m3: m3 / n, m4: m4 / n };
}

/**
 * Sample skewness √b1 = m3/m2^(3/2) with central moments of divisor n (the moment coefficient used by
 * D'Agostino, Belanger & D'Agostino, 1990, Am Stat 44:316–321). 0 for a symmetric sample, 2 for an exponential
 * population. NaN for a constant sample.
 */
export function skewness(x: ArrayLike<number>): number {
  const { m2, m3 } = centralMoments(x);
  return m3 / (m2 * Math.sqrt(m2));
}

/** Sample kurtosis b2 = m4/m2² (3 for a normal population; not the excess). */
export function kurtosis(x: ArrayLike<number>): number {
  const { m2, m4 } = centralMoments(x);
  return m4 / (m2 * m2);
}

export interface NormalityTest {
  n: number;
  /** √b1. */
  skewness: number;
  /** b2 (3 under normality). */
  kurtosis: number;
  /** Z(√b1), the skewness test (D'Agostino, 1970, Biometrika 57:679–681). */
  zSkewness: number;
  /** Z(b2), the kurtosis test (Anscombe & Glynn, 1983, Biometrika 70:227–234). */
  zKurtosis: number;
  /** K² = Z(√b1)² + Z(b2)², approximately χ² with 2 degrees of freedom under normality. */
  k2: number;
  /** P(χ²₂ ≥ K²). */
  p: number;
  /** The paper recommends the kurtosis test (and so K²) from n ≥ 20; false below that, the numbers are approximate. */
  reliable: boolean;
}

/**
 * D'Agostino–Pearson omnibus K² test of normality, with the formulas of D'Agostino, Belanger & D'Agostino (1990,
 * Am Stat 44:316–321, eqs. for Z(√b1) and Z(b2)):
 * skewness: Y = √b1·√((n+1)(n+3)/(6(n−2))), β2(√b1) = 3(n²+27n−70)(n+1)(n+3)/((n−2)(n+5)(n+7)(n+9)),
 * W² = −1 + √(2(β2 − 1)), δ = 1/√(ln W), α = √(2/(W² − 1)), Z(√b1) = δ·ln(Y/α + √((Y/α)² + 1));
 * kurtosis: E(b2) = 3(n−1)/(n+1), Var(b2) = 24n(n−2)(n−3)/((n+1)²(n+3)(n+5)), x = (b2 − E)/√Var,
 * √β1(b2) = 6(n²−5n+2)/((n+7)(n+9))·√(6(n+3)(n+5)/(n(n−2)(n−3))), A = 6 + 8/√β1·(2/√β1 + √(1 + 4/β1)),
 * Z(b2) = ((1 − 2/(9A)) − ∛((1 − 2/A)/(1 + x·√(2/(A − 4)))))/√(2/(9A)).
 * Needs n ≥ 8 (the skewness approximation's lower limit in the paper) and a sample that is not constant.
 */
export function dagostinoPearson(x: ArrayLike<number>): NormalityTest {
  const n = x.length;
  if (n < 8) throw new StatisticsInputError('x', `needs at least 8 values for the K² test, got ${n}`);
  const { m2, m3, m4 } = centralMoments(x);
  if (!(m2 > 0)) throw new StatisticsInputError('x', 'is constant; skewness and kurtosis are undefined');
  const sb1 = m3 / (m2 * Math.sqrt(m2));
  const b2 = m4 / (m2 * m2);

  const y = sb1 * Math.sqrt(((n + 1) * (n + 3)) / (6 * (n - 2)));
  const beta2 = (3 * (n * n + 27 * n - 70) * (n + 1) * (n + 3)) / ((n - 2) * (n + 5) * (n + 7) * (n + 9));
  const w2 = -1 + Math.sqrt(2 * (beta2 - 1));
  const delta = 1 / Math.sqrt(0.5 * Math.log(w2)); // ln W = ½ ln W²
  const alpha = Math.sqrt(2 / (w2 - 1));
  const ya = y / alpha;
  const zSkewness = delta * Math.log(ya + Math.sqrt(ya * ya + 1));

  const eb2 = (3 * (n - 1)) / (n + 1);
  const varb2 = (24 * n * (n - 2) * (n - 3)) / ((n + 1) * (n + 1) * (n + 3) * (n + 5));
  const xk = (b2 - eb2) / Math.sqrt(varb2);
  const sqrtBeta1 = ((6 * (n * n - 5 * n + 2)) / ((n + 7) * (n + 9))) * Math.sqrt((6 * (n + 3) * (n + 5)) / (n * (n - 2) * (n - 3)));
  const a = 6 + (8 / sqrtBeta1) * (2 / sqrtBeta1 + Math.sqrt(1 + 4 / (sqrtBeta1 * sqrtBeta1)));
  const ratio = (1 - 2 / a) / (1 + xk * Math.sqrt(2 / (a - 4)));
  const zKurtosis = (1 - 2 / (9 * a) - Math.cbrt(ratio)) / Math.sqrt(2 / (9 * a));

  const k2 = zSkewness * zSkewness + zKurtosis * zKurtosis;
  return { n, skewness: sb1, kurtosis: b2, zSkewness, zKurtosis, k2, p: chiSquareUpperP(k2, 2), reliable: n >= 20 };
}

/** Two-sided p of a standard normal Z, 2·(1 − Φ(|z|)); for the separate skewness and kurtosis tests. */
export function normalTwoSidedP(z: number): number {
  return 2 * normalCdf(-Math.abs(z));
}
