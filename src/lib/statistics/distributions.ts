// Student t, F and χ² distributions from jstat 1.9.6 (its regularized incomplete beta function and inverse,
// after Numerical Recipes' continued fraction), never from typed-in tables. Tail probabilities are computed
// from the incomplete beta function directly, not as 1 − CDF, so small p values keep their relative precision.
import jStat from 'jstat';

/**
 * Two-sided p of Student's t with `df` degrees of freedom: P(|T| ≥ |t|) = I_{df/(df+t²)}(df/2, 1/2)
 * (Abramowitz & Stegun, 1964, 26.7.1 with 26.5.27). NaN for NaN input; 0 for |t| = ∞.
 */
export function studentTTwoSidedP(t: number, df: number): number {
  if (Number.isNaN(t) || !(df > 0)) return NaN;
  if (!Number.isFinite(t)) return 0;
  if (t === 0) return 1;
  return Math.min(1, jStat.ibeta(df / (df + t * t), df / 2, 0.5));
}

/** P(T ≤ t) for Student's t with `df` degrees of freedom. */
export function studentTCdf(t: number, df: number): number {
  const tail = studentTTwoSidedP(t, df) / 2;
  return t < 0 ? tail : 1 - tail;
}

/** The `p`-quantile of Student's t with `df` degrees of freedom (0 < p < 1), e.g. t(0.975; 9) = 2.262. */
export function studentTQuantile(p: number, df: number): number {
  if (!(p > 0 && p < 1) || !(df > 0)) return NaN;
  return jStat.studentt.inv(p, df);
}

/**
 * Upper tail P(F ≥ f) of the F distribution with (df1, df2) degrees of freedom:
 * I_{df2/(df2+df1·f)}(df2/2, df1/2) (Abramowitz & Stegun, 1964, 26.6.2 and 26.5.2).
 */
export function fUpperP(f: number, df1: number, df2: number): number {
  if (Number.isNaN(f) || !(df1 > 0) || !(df2 > 0)) return NaN;
  if (f <= 0) return 1;
  if (!Number.isFinite(f)) return 0;
  return jStat.ibeta(df2 / (df2 + df1 * f), df2 / 2, df1 / 2);
}

/** P(F ≤ f) of the F distribution with (df1, df2) degrees of freedom. */
export function fCdf(f: number, df1: number, df2: number): number {
  return 1 - fUpperP(f, df1, df2);
}

/** The `p`-quantile of F(df1, df2), e.g. F(0.95; 2, 20) = 3.49. */
export function fQuantile(p: number, df1: number, df2: number): number {
  if (!(p > 0 && p < 1) || !(df1 > 0) || !(df2 > 0)) return NaN;
  return jStat.centralF.inv(p, df1, df2);
}

/** Upper tail P(X ≥ x) of χ² with `df` degrees of freedom: 1 − P(df/2, x/2), the regularized gamma function. */
export function chiSquareUpperP(x: number, df: number): number {
  if (Number.isNaN(x) || !(df > 0)) return NaN;
  if (x <= 0) return 1;
  return 1 - jStat.chisquare.cdf(x, df);
}

/** Standard normal CDF Φ(z). */
export function normalCdf(z: number): number {
  return jStat.normal.cdf(z, 0, 1);
}

/** Standard normal quantile Φ⁻¹(p), 0 < p < 1 (jstat's rational approximation); for Q–Q plots. */
export function normalQuantile(p: number): number {
  return jStat.normal.inv(p, 0, 1);
}
