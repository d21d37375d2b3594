import type { EpochAssignment } from './conditions';
import { epochLength } from './epochs';
import { AnalysisInputError } from './errors';
import type { Recording } from './recording';
import { roundHalfUp } from './rounding';

export interface RejectionRule {
  /** Reject when max − min of a checked channel exceeds this, µV; null disables the rule. */
  peakToPeakMicrovolts: number | null;
  /** Reject when the standard deviation of a checked channel is below this, µV (a flat signal); null disables. */
  flatMicrovolts: number | null;
  /** Channels (indices into recording.data) the rules look at; all channels when null. */
  channelIndices: readonly number[] | null;
  /**
   * Per checked channel (in `channelIndices` order), limits in that channel's own unit (µV, fT, fT/cm) that replace
   * the two µV limits above: the recipe's per-type thresholds (`rejection.byType`).
   */
  limits?: readonly { peakToPeak: number | null; flat: number | null }[];
}

export type EpochFit = 'fits' | 'outside' | 'gap';

export interface EpochCheck {
  eventIndex: number;
  condition: string;
  onsetSeconds: number;
  /** First sample of the epoch: round(onset·fs) + round(start·fs) (analysis contract). */
  startSample: number;
  fit: EpochFit;
  /** True when a rule rejects the epoch or it does not fit (outside the recording, or across a gap). */
  rejectedByRules: boolean;
  reasons: string[];
  /** Largest peak-to-peak amplitude over the checked channels, µV, and its channel; null when it does not fit. */
  peakToPeakMicrovolts: number | null;
  peakToPeakChannel: string | null;
  /** Smallest standard deviation over the checked channels, µV, and its channel. */
  minStdMicrovolts: number | null;
  minStdChannel: string | null;
}

/** Peak-to-peak amplitude `max(x[start..end)) − min(x[start..end))`, in the unit of x (µV here). */
export function peakToPeak(x: Float32Array, start: number, end: number): number {
  let lo = Infinity;
  let hi = -Infinity;
  for (let i = start; i < end; i++) {
    const v = x[i];
    if (v < lo) lo = v;
    if (v > hi) hi = v;
  }
  return end > start ? hi - lo : 0;
}

/**
 * Population standard deviation `sqrt(Σ(xᵢ − x̄)²/n)` of x[start..end), in the unit of x. Computed with the shifted
 * sums `K = x[start]`, `(Σ(x−K)² − (Σ(x−K))²/n)/n` in Float64 (Chan, Golub & LeVeque, 1983, Am Stat 37:242–247),
 * so a large DC offset does not cancel the small variance that flat-signal detection looks for.
 */
export function standardDeviation(x: Float32Array, start: number, end: number): number {
  const n = end - start;
  if (n <= 0) return 0;
  const k = x[start];
  let s = 0;
  let s2 = 0;
  for (let i = start; i < end; i++) {
    const d = x[i] - k;
    s += d;
    s2 += d * d;
  }
  const variance = (s2 - (s * s) / n) / n;
  return variance > 0 ? Math.sqrt(variance) : 0;
}

/**
 * `peakToPeak` and `standardDeviation` of x[start..end) in one pass over the samples (`out[0]`, `out[1]`), with the
 * same arithmetic in the same order, so the same numbers: checking every epoch of a long recording reads each
 * sample once instead of twice.
 */
export function epochStats(x: Float32Array, start: number, end: number, out: Float64Array): void {
  const n = end - start;
  if (n <= 0) {
    out[0] = 0;
    out[1] = 0;
    return;
  }
  const k = x[start];
  let lo = k;
  let hi = k;
  let s = 0;
  let s2 = 0;
  for (let i = start; i < end; i++) {
    const v = x[i];
    if (v < lo) lo = v;
    else if (v > hi) hi = v;
    const d = v - k;
    s += d;
    s2 += d * d;
  }
  out[0] = hi - lo;
  const variance = (s2 - (s * s) / n) / n;
  out[1] = variance > 0 ? Math.sqrt(variance) : 0;
}

// Per channel array and epoch length, the stats of every epoch start already checked: changing a threshold, the
// checked channels, a manual decision or the conditions then reads no samples. Samples are never written once decoded
// (DEVELOPERS.md, "Cross-origin isolation and shared samples"), so an array's stats stay true; other conditioning
// makes new arrays, which are new keys, and an entry goes with its array (WeakMap).
const statsCache = new WeakMap<Float32Array, { length: number; byStart: Map<number, number>; values: number[] }>();

/** `epochStats` of x[start..start+length), remembered (see `statsCache`). */
function rememberedEpochStats(x: Float32Array, start: number, length: number, out: Float64Array): void {
  let entry = statsCache.get(x);
  if (entry === undefined || entry.length !== length) {
    entry = { length, byStart: new Map(), values: [] };
    statsCache.set(x, entry);
  }
  const at = entry.byStart.get(start);
  if (at !== undefined) {
    out[0] = entry.values[at];
    out[1] = entry.values[at + 1];
    return;
  }
  epochStats(x, start, start + length, out);
  entry.byStart.set(start, entry.values.length);
  entry.values.push(out[0], out[1]);
}

const format = (uv: number) => (uv >= 100 ? uv.toFixed(0) : uv.toFixed(uv >= 10 ? 1 : 2));

/**
 * Checks the epoch of every assigned event. The epoch of an event at onset `o` s holds `round((end − start)·fs) + 1`
 * samples from `round(o·fs) + round(start·fs)` (the same rule as `selectEpochs`). An epoch that runs past either end
 * of the recording, or that contains the start of a new continuous block (`gapSampleIndices`, EDF+D), does not fit
 * and is rejected. A fitting epoch is rejected when any checked channel's peak-to-peak amplitude exceeds
 * `peakToPeakMicrovolts` (a 150 µV threshold is a common rule of thumb for scalp EEG) or its standard deviation is
 * below `flatMicrovolts` (a flat, disconnected or saturated channel).
 */
export function checkEpochs(
  recording: Recording,
  assignments: readonly EpochAssignment[],
  window: { start: number; end: number },
  rule: RejectionRule,
): EpochCheck[] {
  const fs = recording.sampleRateHz;
  if (!(window.end > window.start)) throw new AnalysisInputError('epochs.end', `(${window.end} s) must be after epochs.start (${window.start} s)`);
  if (rule.peakToPeakMicrovolts !== null && !(rule.peakToPeakMicrovolts > 0)) {
    throw new AnalysisInputError('rejection.peakToPeakMicrovolts', 'must be a positive number of µV');
  }
  if (rule.flatMicrovolts !== null && !(rule.flatMicrovolts >= 0)) {
    throw new AnalysisInputError('rejection.flatMicrovolts', 'must be zero or a positive number of µV');
  }
  const channels = rule.channelIndices ?? recording.data.map((_, c) => c);
  for (const c of channels) {
    if (!(Number.isInteger(c) && c >= 0 && c < recording.data.length)) {
      throw new AnalysisInputError('rejection.channels', `index ${c} is not a channel of this recording`);
    }
  }
  const total = recording.data.length > 0 ? recording.data[0].length : 0;
  const length = epochLength(window.start, window.end, fs);
  const offset = roundHalfUp(window.start * fs);
  const gaps = recording.gapSampleIndices ?? [];
  const limits = rule.limits ?? channels.map(() => ({ peakToPeak: rule.peakToPeakMicrovolts, flat: rule.flatMicrovolts }));
  if (limits.length !== channels.length) throw new AnalysisInputError('rejection', `has ${limits.length} limits for ${channels.length} checked channels`);

  const out: EpochCheck[] = [];
  const stats = new Float64Array(2);
  for (const a of assignments) {
    const start = roundHalfUp(a.onsetSeconds * fs) + offset;
    const end = start + length;
    const check: EpochCheck = {
      eventIndex: a.eventIndex,
      condition: a.condition,
      onsetSeconds: a.onsetSeconds,
      startSample: start,
      fit: 'fits',
      rejectedByRules: false,
      reasons: [],
      peakToPeakMicrovolts: null,
      peakToPeakChannel: null,
      minStdMicrovolts: null,
      minStdChannel: null,
    };
    out.push(check);
    if (start < 0 || end > total) {
      check.fit = 'outside';
      check.rejectedByRules = true;
      check.reasons.push('outside the recording');
      continue;
    }
    if (gaps.some((g) => g > start && g < end)) {
      check.fit = 'gap';
      check.rejectedByRules = true;
      check.reasons.push('spans a recording gap');
      continue;
    }
    let worstP2p = -1;
    let worstStd = Infinity;
    for (let k = 0; k < channels.length; k++) {
      const c = channels[k];
      const x = recording.data[c];
      const name = recording.channelNames[c];
      const unit = recording.channelUnits?.[c] ?? 'µV';
      const p2pLimit = limits[k].peakToPeak;
      const flatLimit = limits[k].flat;
      rememberedEpochStats(x, start, length, stats);
      const p2p = stats[0];
      const sd = stats[1];
      if (p2p > worstP2p) {
        worstP2p = p2p;
        check.peakToPeakChannel = name;
      }
      if (sd < worstStd) {
        worstStd = sd;
        check.minStdChannel = name;
      }
      if (p2pLimit !== null && p2p > p2pLimit) check.reasons.push(`peak-to-peak ${format(p2p)} ${unit} on ${name}`);
      if (flatLimit !== null && sd < flatLimit) check.reasons.push(`flat on ${name} (SD ${sd.toFixed(2)} ${unit})`);
    }
    check.peakToPeakMicrovolts = channels.length > 0 ? worstP2p : null;
    check.minStdMicrovolts = channels.length > 0 ? worstStd : null;
    check.rejectedByRules = check.reasons.length > 0;
  }
  return out;
}

export interface EpochVerdict {
  rejected: boolean;
  /** Rule reasons, plus "manual" when a person's decision overrides the rules. */
  reasons: string[];
  manual: 'keep' | 'reject' | null;
}

/**
 * A person's decision wins over the rules, except that an epoch which does not fit the recording cannot be kept
 * (it has no samples to keep).
 */
export function applyOverride(check: EpochCheck, override: 'keep' | 'reject' | undefined): EpochVerdict {
  if (override === undefined || check.fit !== 'fits') return { rejected: check.rejectedByRules, reasons: [...check.reasons], manual: null };
  if (override === 'reject') return { rejected: true, reasons: ['manual', ...check.reasons], manual: 'reject' };
  return { rejected: false, reasons: check.reasons.length > 0 ? ['manual keep', ...check.reasons.map((r) => `(rules: ${r})`)] : ['manual keep'], manual: 'keep' };
}

export interface ConditionTally {
  condition: string;
  total: number;
  kept: number;
  rejected: number;
  /** Of the rejected: epochs that run past either end of the recording, and epochs across a gap. */
  outside: number;
  gap: number;
}

/** Kept and rejected counts per condition, in order of first appearance. */
export function tallyByCondition(items: readonly { condition: string; rejected: boolean; fit: EpochFit }[]): ConditionTally[] {
  const byName = new Map<string, ConditionTally>();
  for (const d of items) {
    let t = byName.get(d.condition);
    if (!t) {
      t = { condition: d.condition, total: 0, kept: 0, rejected: 0, outside: 0, gap: 0 };
      byName.set(d.condition, t);
    }
    t.total++;
    if (d.rejected) t.rejected++;
    else t.kept++;
    if (d.fit === 'outside') t.outside++;
    if (d.fit === 'gap') t.gap++;
  }
  return [...byName.values()];
}
