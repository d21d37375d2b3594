import type { BaselineMethod } from './baseline';
import { renormalizeAverage } from './renormalize';

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

export interface BandSpec {
  name: string;
  lowHz: number;
  highHz: number;
}

export interface WindowSpec {
  name: string;
  startSeconds: number;
  endSeconds: number;
}

export interface BandSummaryRow<B extends BandSpec = BandSpec, W extends WindowSpec = WindowSpec> {
  band: B;
  window: W;
  channel: string;
  condition: string;
  value: number;
  cells: number;
}

/**
 * Every band × window × channel × condition mean of the trial-averaged normalized map (average scope): each
 * `power[channel][condition]` (`[f·T + t]`, µV²) is normalized to baseline points `first … last` with `method`
 * (`renormalizeAverage`, the same code as the Maps screen), then averaged with `bandWindowMean` outside the edge
 * zones. Rows in channel, condition, band, window order.
 */
export function summarizeBands<B extends BandSpec, W extends WindowSpec>(
  input: {
    channels: readonly string[];
    labels: readonly string[];
    power: readonly (readonly Float64Array[])[];
    frequencies: Float64Array;
    times: Float64Array;
    mask: Uint8Array | null;
  },
  points: { first: number; last: number },
  method: BaselineMethod,
  bands: readonly B[],
  windows: readonly W[],
): BandSummaryRow<B, W>[] {
  const nt = input.times.length;
  const buf = new Float64Array(input.frequencies.length * nt);
  const rows: BandSummaryRow<B, W>[] = [];
  input.channels.forEach((channel, c) => {
    input.labels.forEach((condition, k) => {
      renormalizeAverage(buf, input.power[c][k], nt, points.first, points.last, method);
      for (const band of bands) {
        for (const window of windows) {
          const { mean, cells } = bandWindowMean(buf, input.frequencies, input.times, input.mask, band.lowHz, band.highHz, window.startSeconds, window.endSeconds);
          rows.push({ band, window, channel, condition, value: mean, cells });
        }
      }
    });
  });
  return rows;
}

/** Why a band cannot be summarized on this frequency grid, or null. */
export function bandProblem(b: BandSpec, frequencies: ArrayLike<number>): string | null {
  if (!(b.lowHz < b.highHz)) return `${b.name}: the low edge (${b.lowHz} Hz) must be below the high edge (${b.highHz} Hz)`;
  const inside = Array.from(frequencies).some((f) => f >= b.lowHz - 1e-9 && f <= b.highHz + 1e-9);
  if (!inside) return `${b.name}: ${b.lowHz}–${b.highHz} Hz holds no frequency of the grid (${frequencies[0].toFixed(1)}–${frequencies[frequencies.length - 1].toFixed(1)} Hz)`;
  return null;
}

/** Why a time window cannot be summarized in this epoch, or null. */
export function windowProblem(w: WindowSpec, times: ArrayLike<number>): string | null {
  if (!(w.startSeconds <= w.endSeconds)) return `${w.name}: the start (${w.startSeconds} s) must not be after the end (${w.endSeconds} s)`;
  if (w.endSeconds < times[0] || w.startSeconds > times[times.length - 1]) return `${w.name}: lies outside the epoch (${times[0]} to ${times[times.length - 1].toFixed(3)} s)`;
  return null;
}
