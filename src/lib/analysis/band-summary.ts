/**
 * Mean of a normalized time-frequency map (`values[f·nTimes + t]`) over the cells with lowHz ≤ f ≤ highHz and
 * startSeconds ≤ t ≤ endSeconds, leaving out cells whose mask entry is non-zero (edge zones) and non-finite
 * values. Returns the mean and the number of cells averaged; no cell gives NaN and 0.
 */
export function bandWindowMean(
  values: ArrayLike<number>,
  frequencies: ArrayLike<number>,
  times: ArrayLike<number>,
  mask: ArrayLike<number> | null,
  lowHz: number,
  highHz: number,
  startSeconds: number,
  endSeconds: number,
): { mean: number; cells: number } {
  const nt = times.length;
  const eps = 1e-9;
  let t0 = 0;
  while (t0 < nt && times[t0] < startSeconds - eps) t0++;
  let t1 = nt - 1;
  while (t1 >= 0 && times[t1] > endSeconds + eps) t1--;
  let sum = 0;
  let cells = 0;
  for (let f = 0; f < frequencies.length; f++) {
    const hz = frequencies[f];
    if (hz < lowHz - eps || hz > highHz + eps) continue;
    const off = f * nt;
    for (let t = t0; t <= t1; t++) {
      if (mask !== null && mask[off + t] !== 0) continue;
      const v = values[off + t];
      if (!Number.isFinite(v)) continue;
      sum += v;
      cells++;
    }
  }
  return { mean: cells > 0 ? sum / cells : NaN, cells };
}
