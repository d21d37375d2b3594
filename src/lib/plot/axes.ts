import { scaleLinear, scaleLog } from 'd3-scale';

/** A continuous position scale: value → pixel, with its ticks. */
export interface AxisScale {
  (value: number): number;
  invert(pixel: number): number;
  ticks(count?: number): number[];
  domain(): number[];
}

/**
 * Time axis of a map: the cell of time t_j spans [t_j − dt/2, t_j + dt/2], so the axis domain runs half a
 * sample beyond the first and last grid times and each cell sits centred on its time.
 */
export function timeScale(times: ArrayLike<number>, x0: number, x1: number): AxisScale {
  const n = times.length;
  const dt = n > 1 ? (times[n - 1] - times[0]) / (n - 1) : 1;
  return scaleLinear().domain([times[0] - dt / 2, times[n - 1] + dt / 2]).range([x0, x1]) as unknown as AxisScale;
}

/**
 * Frequency axis that follows the grid's spacing: every row has the same height, so a log-spaced grid gets a log
 * axis (rows span [f_i/√r, f_i·√r], r the grid ratio) and a linear grid a linear one (rows span f_i ± df/2).
 * Pixel y0 is the bottom (lowest frequency).
 */
export function frequencyScale(frequencies: ArrayLike<number>, spacing: 'log' | 'linear', y0: number, y1: number): AxisScale {
  const n = frequencies.length;
  const lo = frequencies[0];
  const hi = frequencies[n - 1];
  if (spacing === 'log') {
    const r = n > 1 ? Math.pow(hi / lo, 1 / (n - 1)) : 1.2;
    return scaleLog().domain([lo / Math.sqrt(r), hi * Math.sqrt(r)]).range([y0, y1]) as unknown as AxisScale;
  }
  const df = n > 1 ? (hi - lo) / (n - 1) : 1;
  return scaleLinear().domain([lo - df / 2, hi + df / 2]).range([y0, y1]) as unknown as AxisScale;
}

/** Log-axis ticks thinned to 1, 2 and 5 × 10^k (the full decade set crowds a 300 px axis). */
export function logTicks(scale: AxisScale, count = 6): number[] {
  const all = scale.ticks(count);
  const thin = all.filter((v) => {
    const m = v / Math.pow(10, Math.floor(Math.log10(v) + 1e-9));
    return Math.abs(m - 1) < 1e-6 || Math.abs(m - 2) < 1e-6 || Math.abs(m - 5) < 1e-6;
  });
  return thin.length >= 2 ? thin : all;
}

/**
 * Ticks of an axis that always show where the range ends: the scale's own ticks (nice steps: 1, 2 or 5 × 10^k, as
 * d3's `ticks` picks them; `log` thins them to 1, 2 and 5 × 10^k) plus `lo` and `hi`, the first and last grid
 * values, with any nice tick closer than `minGapPx` pixels to an end left out so labels never overlap.
 */
export function ticksWithEnds(scale: AxisScale, lo: number, hi: number, count: number, log: boolean, minGapPx = 28): number[] {
  const nice = (log ? logTicks(scale, count) : scale.ticks(count)).filter((v) => v > Math.min(lo, hi) && v < Math.max(lo, hi));
  const ends = [lo, hi];
  const inner = nice.filter((v) => ends.every((e) => Math.abs(scale(v) - scale(e)) >= minGapPx));
  return [lo, ...inner, hi];
}

/** Label of a range end (a grid value, not a nice step): up to 4 significant digits, so 1.998 is not shown as 2. */
export function formatEndTick(v: number): string {
  if (v === 0) return '0';
  return Number(v.toPrecision(4)).toString();
}

/** Short tick label: integers plain, otherwise up to 3 significant digits. */
export function formatTick(v: number): string {
  if (v === 0) return '0';
  if (Math.abs(v) >= 1000 || Math.abs(v) < 0.01) return v.toExponential(0);
  return Number(v.toPrecision(3)).toString();
}
