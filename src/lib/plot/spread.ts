/**
 * Quantile of ascending `sorted` values at probability p ∈ [0, 1], by linear interpolation between order statistics:
 * h = (n − 1)·p, Q = x⌊h⌋ + (h − ⌊h⌋)(x⌊h⌋+1 − x⌊h⌋) — definition 7 of Hyndman & Fan (1996, The American
 * Statistician 50:361), the default of R's `quantile` and NumPy's `percentile`. An empty array gives NaN.
 */
export function quantileSorted(sorted: ArrayLike<number>, p: number): number {
  const n = sorted.length;
  if (n === 0) return NaN;
  const h = (n - 1) * Math.min(1, Math.max(0, p));
  const lo = Math.floor(h);
  const hi = Math.min(n - 1, lo + 1);
  return sorted[lo] + (h - lo) * (sorted[hi] - sorted[lo]);
}

/**
 * Per frequency bin, the `low` and `high` quantiles (definition 7, above) of the epochs' power: `perTrial` holds
 * `trials` spectra of `bins` values each, one after another. Non-finite values are left out; a bin with none gives NaN.
 */
export function epochSpread(perTrial: ArrayLike<number>, trials: number, bins: number, low = 0.1, high = 0.9): { low: Float64Array; high: Float64Array } {
  const lo = new Float64Array(bins);
  const hi = new Float64Array(bins);
  const column = new Float64Array(trials);
  for (let b = 0; b < bins; b++) {
    let n = 0;
    for (let k = 0; k < trials; k++) {
      const v = perTrial[k * bins + b];
      if (Number.isFinite(v)) column[n++] = v;
    }
    const sorted = column.subarray(0, n).sort();
    lo[b] = quantileSorted(sorted, low);
    hi[b] = quantileSorted(sorted, high);
  }
  return { low: lo, high: hi };
}
