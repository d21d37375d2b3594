/**
 * How a value becomes a position t ∈ [0, 1] on a colormap: `linear` t = (v − lo)/(hi − lo), `log`
 * t = (log v − log lo)/(log hi − log lo). Values outside the domain clamp to its ends; values with no position
 * (NaN, ±Infinity, v ≤ 0 on a log scale) get none, and are drawn in the "no value" colour.
 */
export interface ColourScale {
  domain: [number, number];
  kind: 'linear' | 'log';
}

/** t of `value` on `scale`, or NaN when the value has no position. An empty domain maps to 0.5 (as d3 does). */
export function colourPosition(scale: ColourScale, value: number): number {
  if (!Number.isFinite(value)) return NaN;
  let [lo, hi] = scale.domain;
  let v = value;
  if (scale.kind === 'log') {
    if (!(v > 0) || !(lo > 0) || !(hi > 0)) return NaN;
    v = Math.log(v);
    lo = Math.log(lo);
    hi = Math.log(hi);
  }
  if (!(hi > lo)) return 0.5;
  const t = (v - lo) / (hi - lo);
  return t < 0 ? 0 : t > 1 ? 1 : t;
}

/** The method's neutral value: no change from baseline. 0 for dB, percent and z-score, 1 for a ratio. */
export function neutralValue(method: 'decibel' | 'percent-change' | 'z-score' | 'power-ratio'): number {
  return method === 'power-ratio' ? 1 : 0;
}

/** The unit shown on colour bars and readouts. */
export function methodUnit(method: 'decibel' | 'percent-change' | 'z-score' | 'power-ratio'): string {
  return method === 'decibel' ? 'dB' : method === 'percent-change' ? '%' : method === 'z-score' ? 'z' : '×';
}

/**
 * Symmetric limits around `neutral`: [n − m, n + m] with m the largest |v − n| over finite values whose mask
 * entry is 0 (edge-zone cells are left out so edge-affected extremes do not wash out the map). All-masked or
 * constant data give m = 1 so the scale stays usable.
 */
export function symmetricLimits(values: ArrayLike<number>, neutral: number, mask: ArrayLike<number> | null = null): [number, number] {
  let m = 0;
  for (let i = 0; i < values.length; i++) {
    if (mask !== null && mask[i] !== 0) continue;
    const d = Math.abs(values[i] - neutral);
    if (d > m && d !== Infinity) m = d;
  }
  if (!(m > 0)) m = 1;
  return [neutral - m, neutral + m];
}

/**
 * Limits of raw power: [min, max] over finite unmasked values (only positive ones for a log scale). Empty data give
 * [0, 1] for linear and [1, 10] for log.
 */
export function extentLimits(values: ArrayLike<number>, kind: 'linear' | 'log', mask: ArrayLike<number> | null = null): [number, number] {
  let lo = Infinity;
  let hi = -Infinity;
  for (let i = 0; i < values.length; i++) {
    if (mask !== null && mask[i] !== 0) continue;
    const v = values[i];
    if (!Number.isFinite(v) || (kind === 'log' && !(v > 0))) continue;
    if (v < lo) lo = v;
    if (v > hi) hi = v;
  }
  if (!(hi >= lo)) return kind === 'log' ? [1, 10] : [0, 1];
  if (hi === lo) return kind === 'log' ? [lo / 2, hi * 2] : [lo - 1, hi + 1];
  return [lo, hi];
}

/**
 * Limits of a power-ratio map on a log scale centred on 1: [1/m, m] with m the largest of v and 1/v over positive
 * finite unmasked values, so a halving sits as far below the centre as a doubling sits above it. Empty or all-1
 * data give [1/2, 2].
 */
export function ratioLimits(values: ArrayLike<number>, mask: ArrayLike<number> | null = null): [number, number] {
  let m = 1;
  for (let i = 0; i < values.length; i++) {
    if (mask !== null && mask[i] !== 0) continue;
    const v = values[i];
    if (!(v > 0) || v === Infinity) continue;
    const r = v >= 1 ? v : 1 / v;
    if (r > m) m = r;
  }
  if (!(m > 1)) m = 2;
  return [1 / m, m];
}
