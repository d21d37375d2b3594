/**
 * The distribution check: the subjects' raw band power beside their normalized values for one cell, each with a
 * histogram, a normal Q–Q plot, skewness and the D'Agostino–Pearson K² test (D'Agostino, Belanger & D'Agostino,
 * 1990, Am Stat 44:316–321), and one plain sentence on which of the two looks normal. Raw power is positive and
 * right-skewed; normalizing is what makes it fit for a t-test (common practice).
 */
import { normalQuantile } from '../statistics/distributions';
import { dagostinoPearson, skewness, type NormalityTest } from '../statistics/normality';

export interface HistogramBin {
  from: number;
  to: number;
  count: number;
}

export interface QqPoint {
  /** Φ⁻¹ of the plotting position (i − 3/8)/(n + 1/4) (Blom, 1958, Statistical Estimates and Transformed Beta-Variables). */
  theoretical: number;
  /** The i-th smallest value. */
  sample: number;
  subject: string;
}

export interface DistributionSide {
  n: number;
  mean: number;
  sd: number;
  skewness: number | null;
  /** K² and its parts; null below 8 values or for a constant sample. */
  normality: NormalityTest | null;
  histogram: HistogramBin[];
  qq: QqPoint[];
}

/**
 * Equal-width bins over [min, max], k = ⌈log₂ n⌉ + 1 of them (Sturges, 1926, J Am Stat Assoc 21:65–66); the last
 * bin is closed on the right. A constant sample gets one bin.
 */
export function histogram(values: readonly number[]): HistogramBin[] {
  const n = values.length;
  if (n === 0) return [];
  let lo = Infinity;
  let hi = -Infinity;
  for (const v of values) {
    if (v < lo) lo = v;
    if (v > hi) hi = v;
  }
  if (!(hi > lo)) return [{ from: lo, to: hi, count: n }];
  const k = Math.ceil(Math.log2(n)) + 1;
  const width = (hi - lo) / k;
  const bins: HistogramBin[] = Array.from({ length: k }, (_, i) => ({ from: lo + i * width, to: i === k - 1 ? hi : lo + (i + 1) * width, count: 0 }));
  for (const v of values) bins[Math.min(k - 1, Math.floor((v - lo) / width))].count++;
  return bins;
}

/** Normal Q–Q points: sorted values against Φ⁻¹((i − 3/8)/(n + 1/4)), i = 1 … n (Blom's positions). */
export function qqPoints(values: readonly { subject: string; value: number }[]): QqPoint[] {
  const n = values.length;
  const sorted = [...values].sort((a, b) => a.value - b.value);
  return sorted.map((v, i) => ({ theoretical: normalQuantile((i + 1 - 0.375) / (n + 0.25)), sample: v.value, subject: v.subject }));
}

export function describeSide(values: readonly { subject: string; value: number }[]): DistributionSide {
  const x = values.map((v) => v.value);
  const n = x.length;
  const mean = n === 0 ? NaN : x.reduce((a, b) => a + b, 0) / n;
  const sd = n < 2 ? NaN : Math.sqrt(x.reduce((a, b) => a + (b - mean) * (b - mean), 0) / (n - 1));
  const constant = n === 0 || x.every((v) => v === x[0]);
  return {
    n,
    mean,
    sd,
    skewness: n >= 3 && !constant ? skewness(x) : null,
    normality: n >= 8 && !constant ? dagostinoPearson(x) : null,
    histogram: histogram(x),
    qq: qqPoints(values),
  };
}

/** Looks normal: K² does not reject at 0.05 and |skewness| < 1 (a rule of thumb, common practice). */
export function looksNormal(side: DistributionSide): boolean | null {
  if (side.normality === null) return null;
  return side.normality.p >= 0.05 && Math.abs(side.normality.skewness) < 1;
}

const f2 = (x: number) => x.toFixed(2);
const fp = (p: number) => (p < 0.001 ? p.toExponential(1) : p.toFixed(3));
const stats = (s: DistributionSide) => (s.normality === null ? `skewness ${s.skewness === null ? '—' : f2(s.skewness)}` : `skewness ${f2(s.normality.skewness)}, K² = ${f2(s.normality.k2)}, p = ${fp(s.normality.p)}`);

/** One plain sentence on which of raw and normalized values looks normal for this cell. */
export function distributionSentence(cell: string, raw: DistributionSide, normalized: DistributionSide): string {
  const n = normalized.n;
  if (normalized.normality === null || raw.normality === null) {
    return `For ${cell}, ${n} subject${n === 1 ? '' : 's'} are too few for the K² test (it needs 8); judge the Q–Q plots by eye (raw: ${stats(raw)}; normalized: ${stats(normalized)}).`;
  }
  const r = looksNormal(raw);
  const z = looksNormal(normalized);
  const caveat = n < 20 ? ` With ${n} subjects (fewer than 20) K² is approximate and misses mild departures.` : '';
  const detail = `(normalized: ${stats(normalized)}; raw: ${stats(raw)})`;
  if (z && !r) return `For ${cell}, the normalized values look close to normal and raw power does not ${detail}: the t-tests here are on the right scale.${caveat}`;
  if (z && r) return `For ${cell}, both the normalized values and raw power look close to normal ${detail}.${caveat}`;
  if (!z && !r) return `For ${cell}, neither the normalized values nor raw power look normal ${detail}: read the t-tests here with care, or look for outlying subjects in the Q–Q plot.${caveat}`;
  return `For ${cell}, raw power looks closer to normal than the normalized values ${detail}: check the normalized Q–Q plot for outlying subjects.${caveat}`;
}
