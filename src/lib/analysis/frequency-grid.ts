import { AnalysisInputError } from './errors';
import { pow } from './portable-math';

export type FrequencySpacing = 'log' | 'linear';

export interface FrequencyGridSpec {
  min: number;
  max: number;
  count: number;
  spacing: FrequencySpacing;
}

/**
 * Frequencies in Hz, `count` of them from `min` to `max` inclusive (analysis contract, "Units and grids"):
 * log spacing `f_i = min·(max/min)^(i/(count−1))`, linear spacing `f_i = min + i·(max−min)/(count−1)`.
 * A single frequency (`count` 1) is `min`.
 */
export function frequencyGrid(spec: FrequencyGridSpec): Float64Array {
  const { min, max, count, spacing } = spec;
  if (!(min > 0) || !Number.isFinite(min)) throw new AnalysisInputError('frequencies.min', `must be a positive number of Hz (got ${min})`);
  if (!(max >= min) || !Number.isFinite(max)) throw new AnalysisInputError('frequencies.max', `must be at least frequencies.min (${min} Hz)`);
  if (!Number.isInteger(count) || count < 1) throw new AnalysisInputError('frequencies.count', `must be a whole number ≥ 1 (got ${count})`);
  const out = new Float64Array(count);
  if (count === 1) {
    out[0] = min;
    return out;
  }
  const last = count - 1;
  for (let i = 0; i < count; i++) {
    out[i] = spacing === 'log' ? min * pow(max / min, i / last) : min + (i * (max - min)) / last;
  }
  return out;
}

/**
 * Geometric spread of `min`..`max` over `count` indices: `v_i = min·(max/min)^(i/(count−1))` (the contract's
 * cycles rule). A single index gets `min`.
 */
export function geometricSpread(min: number, max: number, count: number): Float64Array {
  const out = new Float64Array(count);
  for (let i = 0; i < count; i++) out[i] = count === 1 ? min : min * pow(max / min, i / (count - 1));
  return out;
}
