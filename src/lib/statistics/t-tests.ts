import { StatisticsInputError } from './errors';
import { studentTQuantile, studentTTwoSidedP } from './distributions';

/** One cell of a one-sample or paired test (statistics contract, "Definitions"). */
export interface TTestResult {
  n: number;
  mean: number;
  /** Sample standard deviation, n − 1 in the denominator. */
  sd: number;
  se: number;
  t: number;
  df: number;
  /** Two-sided. */
  p: number;
  /** `mean ± t(1 − (1 − confidence)/2, df)·se`; the contract's `ci95` at the default confidence 0.95. */
  ci95: [number, number];
  /** Cohen's d_z = mean/sd (Cohen, 1988, Statistical Power Analysis, 2nd ed., §2.3.5). */
  dz: number;
}

/**
 * Student's one-sample t-test (Student, 1908, Biometrika 6:1–25) of x_i − neutral: m = Σx/n,
 * s = √(Σ(x − m)²/(n − 1)), se = s/√n, t = m/se, df = n − 1, two-sided p, CI m ± t(0.975, df)·se, d_z = m/s.
 * Sums run in Float64 in index order. Needs n ≥ 2; s = 0 gives t = ±∞ (p = 0) or NaN for m = 0.
 */
export function oneSampleTest(x: ArrayLike<number>, neutral = 0, confidence = 0.95): TTestResult {
  const n = x.length;
  if (n < 2) throw new StatisticsInputError('x', `needs at least 2 values for a t-test, got ${n}`);
  let sum = 0;
  for (let i = 0; i < n; i++) sum += x[i] - neutral;
  const mean = sum / n;
  let ss = 0;
  for (let i = 0; i < n; i++) {
    const d = x[i] - neutral - mean;
    ss += d * d;
  }
  const sd = Math.sqrt(ss / (n - 1));
  const se = sd / Math.sqrt(n);
  const t = mean / se;
  const df = n - 1;
  const half = studentTQuantile(1 - (1 - confidence) / 2, df) * se;
  return { n, mean, sd, se, t, df, p: studentTTwoSidedP(t, df), ci95: [mean - half, mean + half], dz: mean / sd };
}

/**
 * Paired t-test: the one-sample test of d_i = a_i − b_i (Student, 1908). `a` and `b` hold the same subjects in the
 * same order; the mean, CI and d_z are those of the differences.
 */
export function pairedTest(a: ArrayLike<number>, b: ArrayLike<number>, confidence = 0.95): TTestResult {
  if (a.length !== b.length) throw new StatisticsInputError('b', `has ${b.length} values but a has ${a.length}; pairs need both`);
  const d = new Float64Array(a.length);
  for (let i = 0; i < a.length; i++) d[i] = a[i] - b[i];
  return oneSampleTest(d, 0, confidence);
}
