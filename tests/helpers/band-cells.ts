// The mean of a core Result's normalized map over one band × window, written out cell by cell for the browser tests
// that check the Bands table and the per-trial CSV against it: frequencies inside the band, times inside the window
// (1e-9 s of slack for the grid's rounding), leaving out edge-zone cells (closer than edgeSeconds[f] to an epoch edge).
import type { AnalysisResult } from '../../src/lib/analysis/run-recipe';

export function bandWindowMean(r: AnalysisResult, condition: string, channel: number, band: [number, number], window: [number, number]): { mean: number; n: number } {
  const map = r.conditions[condition].normalized[channel];
  let sum = 0;
  let n = 0;
  r.frequencies.forEach((f, fi) => {
    if (f < band[0] || f > band[1]) return;
    r.times.forEach((t, ti) => {
      if (t < window[0] - 1e-9 || t > window[1] + 1e-9) return;
      if (t - r.times[0] < r.edgeSeconds[fi] || r.times[r.times.length - 1] - t < r.edgeSeconds[fi]) return;
      sum += map[fi][ti]!;
      n++;
    });
  });
  return { mean: sum / n, n };
}
