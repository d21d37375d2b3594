import { baselineStats, normalizeValue, type BaselineMethod } from './baseline';
import { bandWindowMean } from './band-summary';

/** A band × window cell of the per-trial table. */
export interface TrialBandWindow {
  lowHz: number;
  highHz: number;
  startSeconds: number;
  endSeconds: number;
}

/**
 * Per trial, the mean of that trial's power normalized by its own baseline (grid points first … last, `method`;
 * analysis contract, "Baseline normalization", scope `trial`) over each band × window (`bandWindowMean`: edge-zone
 * cells and non-finite values left out), as the summary's per-trial values (summary.ts) compute them. `trials` holds
 * `count` trials `[(k·nFreqs + f)·nTimes + t]` µV². Returns `out[cell][k]`; only the band rows are normalized.
 * For a linear method (percent change, power ratio) the mean over trials is the trial-scope band value.
 */
export function trialBandValues(
  trials: ArrayLike<number>,
  count: number,
  frequencies: ArrayLike<number>,
  times: ArrayLike<number>,
  mask: ArrayLike<number> | null,
  first: number,
  last: number,
  method: BaselineMethod,
  cells: readonly TrialBandWindow[],
): Float64Array[] {
  const nf = frequencies.length;
  const nt = times.length;
  const size = nf * nt;
  const out = cells.map(() => new Float64Array(count));
  const eps = 1e-9;
  const rows = new Set<number>();
  for (const c of cells) for (let f = 0; f < nf; f++) if (frequencies[f] >= c.lowHz - eps && frequencies[f] <= c.highHz + eps) rows.add(f);
  const one = new Float64Array(size).fill(Number.NaN);
  for (let k = 0; k < count; k++) {
    const base = k * size;
    for (const f of rows) {
      const stats = baselineStats(trials, base + f * nt, first, last);
      for (let t = 0; t < nt; t++) one[f * nt + t] = normalizeValue(method, trials[base + f * nt + t], stats.mean, stats.sd);
    }
    cells.forEach((c, i) => {
      out[i][k] = bandWindowMean(one, frequencies, times, mask, c.lowHz, c.highHz, c.startSeconds, c.endSeconds).mean;
    });
  }
  return out;
}
