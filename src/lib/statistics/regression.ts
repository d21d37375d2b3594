import { StatisticsInputError } from './errors';
import { studentTTwoSidedP } from './distributions';

export interface RegressionResult {
  n: number;
  slope: number;
  intercept: number;
  /** Pearson's r. */
  r: number;
  /** slope / se(slope). */
  t: number;
  df: number;
  /** Two-sided p of t with n − 2 degrees of freedom (the same as testing r = 0). */
  p: number;
  /** se(slope) = √(SSE/(n − 2)/Sxx). */
  seSlope: number;
}

/**
 * Ordinary least squares of y on x (Gauss; e.g. Draper & Smith, 1998, Applied Regression Analysis, ch. 1):
 * Sxx = Σ(x − x̄)², Sxy = Σ(x − x̄)(y − ȳ), Syy = Σ(y − ȳ)², slope = Sxy/Sxx, intercept = ȳ − slope·x̄,
 * r = Sxy/√(Sxx·Syy), SSE = Σ(y − ŷ)², se(slope) = √(SSE/(n − 2)/Sxx), t = slope/se, df = n − 2.
 * Needs n ≥ 3 and x not constant.
 */
export function linearRegression(x: ArrayLike<number>, y: ArrayLike<number>): RegressionResult {
  const n = x.length;
  if (y.length !== n) throw new StatisticsInputError('y', `has ${y.length} values but x has ${n}`);
  if (n < 3) throw new StatisticsInputError('x', `needs at least 3 subjects for a regression, got ${n}`);
  let sx = 0;
  let sy = 0;
  for (let i = 0; i < n; i++) {
    sx += x[i];
    sy += y[i];
  }
  const mx = sx / n;
  const my = sy / n;
  let sxx = 0;
  let sxy = 0;
  let syy = 0;
  for (let i = 0; i < n; i++) {
    const dx = x[i] - mx;
    const dy = y[i] - my;
    sxx += dx * dx;
    sxy += dx * dy;
    syy += dy * dy;
  }
  if (sxx === 0) throw new StatisticsInputError('x', 'is the same for every subject; a slope needs the covariate to vary');
  const slope = sxy / sxx;
  const intercept = my - slope * mx;
  let sse = 0;
  for (let i = 0; i < n; i++) {
    const e = y[i] - intercept - slope * x[i];
    sse += e * e;
  }
  const df = n - 2;
  const seSlope = Math.sqrt(sse / df / sxx);
  const t = slope / seSlope;
  return { n, slope, intercept, r: sxy / Math.sqrt(sxx * syy), t, df, p: studentTTwoSidedP(t, df), seSlope };
}
