import { baselineStats, normalizeRow, type BaselineIndices, type BaselineMethod, type BaselineStats } from './baseline';

/** How the two conditions of a contrast are normalized before one is subtracted from the other. */
export type ContrastBaseline = 'own' | 'shared';

/**
 * Condition A − condition B of one channel's trial-averaged power (`[f·nTimes + t]`, µV², scope average), each
 * normalized with the recipe's method (analysis contract, "Baseline normalization"):
 * - `own`: each condition against its own baseline (the explorer's A − B map until now);
 * - `shared`: both against one baseline per frequency, B = (B_A + B_B)/2 and S = √((S_A² + S_B²)/2), so a
 *   difference already present in the baseline period stays visible instead of being normalized away.
 * Two identical conditions give 0 everywhere with either choice.
 */
export function contrastMap(powerA: Float64Array, powerB: Float64Array, nTimes: number, baseline: BaselineIndices, method: BaselineMethod, choice: ContrastBaseline): Float64Array {
  const out = new Float64Array(powerA.length);
  const rowA = new Float64Array(nTimes);
  const rowB = new Float64Array(nTimes);
  for (let off = 0; off < powerA.length; off += nTimes) {
    const a = baselineStats(powerA, off, baseline.first, baseline.last);
    const b = baselineStats(powerB, off, baseline.first, baseline.last);
    const shared: BaselineStats = { mean: (a.mean + b.mean) / 2, sd: Math.sqrt((a.sd * a.sd + b.sd * b.sd) / 2) };
    normalizeRow(rowA, 0, powerA, off, nTimes, method, choice === 'own' ? a : shared);
    normalizeRow(rowB, 0, powerB, off, nTimes, method, choice === 'own' ? b : shared);
    for (let j = 0; j < nTimes; j++) out[off + j] = rowA[j] - rowB[j];
  }
  return out;
}

/** The largest |value| of a contrast map (finite values only), for its own symmetric colour scale. */
export function symmetricLimit(map: ArrayLike<number>): number {
  let m = 0;
  for (let i = 0; i < map.length; i++) if (Number.isFinite(map[i])) m = Math.max(m, Math.abs(map[i]));
  return m;
}
