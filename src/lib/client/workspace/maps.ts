// What the Maps screen draws, computed here (the workspace controller) so the screen only paints: a channel's or a
// channel group's maps, the contrast of two conditions, the phase-consistency marks and the evoked trace.
import { baselinePointsIn, type BaselineMethod } from '../../analysis/baseline';
import { baselineEdgeOverlap } from '../../analysis/edge-zone';
import { defaultChannelGroups, groupIndices, groupMap, type ChannelGroup } from '../../analysis/channel-groups';
import { contrastMap, type ContrastBaseline } from '../../analysis/contrast';
import { rayleighP } from '../../analysis/phase-consistency';
import { renormalizeAverage } from '../../analysis/renormalize';
import type { RecipeInput } from '../../analysis/recipe';
import { ensureTrials, useResultsStore, type Decomposition } from './results';
import { explorerWorker } from '../explorer-worker';
import { useWorkspace } from './store';
import type { Band, TimeWindow } from './view';

export type { ChannelGroup, ContrastBaseline };
export { defaultGroupsFor } from './channel-groups';

/** Baseline grid indices clamped to the epoch, as the core plans them (analysis contract). */
export function baselinePoints(d: Decomposition, baseline: { start: number; end: number }): { first: number; last: number } {
  return baselinePointsIn(baseline.start, baseline.end, d.epochStart, d.sampleRateHz, d.times.length);
}

/** Snaps seconds to the epoch's sample grid t_j = start + j/fs, inside the epoch. */
export function snapToGrid(d: Decomposition, seconds: number): number {
  const nt = d.times.length;
  const j = Math.max(0, Math.min(nt - 1, Math.round((seconds - d.epochStart) * d.sampleRateHz)));
  return d.times[j];
}

/** Problems of a baseline, shown on the map. */
export function baselineWarnings(d: Decomposition, points: { first: number; last: number }, end: number, method: BaselineMethod): string[] {
  const out: string[] = [];
  const nt = d.times.length;
  const hits = baselineEdgeOverlap(d.edges, nt, points.first, points.last);
  const [hit, lo, hi] = [hits.length, hits[0], hits[hits.length - 1]];
  if (hit > 0) {
    const fmt = (x: number) => Number(x.toPrecision(3));
    out.push(`Baseline overlaps the edge zone at ${hit} of ${d.frequencies.length} frequencies (${fmt(d.frequencies[lo])}–${fmt(d.frequencies[hi])} Hz).`);
  }
  if (end > 0) out.push(`Baseline reaches past the event at 0 s (ends at ${Number(end.toFixed(3))} s): it includes the response.`);
  const n = points.last - points.first + 1;
  if (method === 'z-score' && n < 2) out.push(`Baseline holds ${n} sample; a z-score needs at least 2 for a standard deviation.`);
  return out;
}

/** out = a − b, element-wise. */
export function difference(out: Float64Array, a: ArrayLike<number>, b: ArrayLike<number>): Float64Array {
  for (let i = 0; i < out.length; i++) out[i] = a[i] - b[i];
  return out;
}

/** The decomposition's channel groups: the recipe's `channelGroups`, else the defaults from its channel names. */
export function groupsOf(d: Decomposition): ChannelGroup[] {
  const own = d.recipe.channelGroups;
  if (own !== undefined) return Object.entries(own).map(([name, channels]) => ({ name, channels: channels.slice() }));
  return defaultChannelGroups(d.channels);
}

/** Which channels a map averages: the group's (checked against the analysed channels) or the one channel's. */
export function channelIndicesOf(d: Decomposition, channel: string | null, group: string | null): { indices: number[]; label: string; group: ChannelGroup | null } {
  if (group !== null) {
    const g = groupsOf(d).find((x) => x.name === group);
    if (g !== undefined) return { indices: groupIndices(g, d.channels), label: `${g.name} (${g.channels.join(', ')})`, group: g };
  }
  const ci = Math.max(0, channel === null ? 0 : d.channels.indexOf(channel));
  return { indices: [ci], label: d.channels[ci], group: null };
}

/** The mean over `indices` of per-channel maps (`groupMap`), or the one channel's own array. */
export function meanOver(maps: readonly Float64Array[], indices: readonly number[]): Float64Array {
  return indices.length === 1 ? maps[indices[0]] : groupMap(maps, indices);
}

/** Trial-averaged raw power of condition `a` over the chosen channels, µV². */
export function rawPowerOf(d: Decomposition, indices: readonly number[], a: number): Float64Array {
  return meanOver(
    indices.map((c) => d.power[c][a]),
    indices.map((_, i) => i),
  );
}

/**
 * Scope `average`: condition `a` of each chosen channel normalized against its own baseline (grid points
 * first … last, the recipe's method), then the mean over channels: a region's map is the mean of its channels'
 * normalized maps (channel-groups.ts). `reuse`, when given and of the right size, receives a single channel's map.
 */
export function normalizedOf(d: Decomposition, indices: readonly number[], a: number, points: { first: number; last: number }, method: BaselineMethod, reuse: Float64Array | null = null): Float64Array {
  const nt = d.times.length;
  const maps = indices.map((c) => {
    // One channel while the baseline is dragged: the caller's buffer is written again, nothing is allocated.
    const out = indices.length === 1 && reuse !== null && reuse.length === d.power[c][a].length ? reuse : new Float64Array(d.power[c][a].length);
    renormalizeAverage(out, d.power[c][a], nt, points.first, points.last, method);
    return out;
  });
  return meanOver(
    maps,
    maps.map((_, i) => i),
  );
}

/**
 * Condition A − B (scope `average`) of each chosen channel with `contrastMap` (own or shared baseline), then the mean
 * over channels.
 */
export function contrastOf(d: Decomposition, indices: readonly number[], a: number, b: number, points: { first: number; last: number }, method: BaselineMethod, choice: ContrastBaseline): Float64Array {
  const nt = d.times.length;
  const maps = indices.map((c) => contrastMap(d.power[c][a], d.power[c][b], nt, points, method, choice));
  return meanOver(
    maps,
    maps.map((_, i) => i),
  );
}

/** Phase consistency of condition `a` over the chosen channels (mean of the channels' maps), or null without it. */
export function itpcOf(d: Decomposition, indices: readonly number[], a: number): Float64Array | null {
  if (!d.itpc) return null;
  const itpc = d.itpc;
  return meanOver(
    indices.map((c) => itpc[c][a]),
    indices.map((_, i) => i),
  );
}

/**
 * Cells whose phase consistency r over `n` trials passes Rayleigh's test at `alpha` (p from Zar's approximation,
 * `rayleighP`; Zar, Biostatistical Analysis, 1999, eq. 27.4). 1 = marked. Only meaningful for one channel's r: a
 * region's mean r is not a resultant length of n phasors.
 */
export function rayleighMarks(itpc: ArrayLike<number>, n: number, alpha = 0.05): Uint8Array {
  const out = new Uint8Array(itpc.length);
  for (let i = 0; i < itpc.length; i++) out[i] = rayleighP(n, itpc[i]) < alpha ? 1 : 0;
  return out;
}

/** The evoked response of condition `a` (µV per time point) over the chosen channels, or null without induced power. */
export function evokedOf(d: Decomposition, indices: readonly number[], a: number): Float64Array | null {
  if (!d.evoked) return null;
  const evoked = d.evoked;
  return meanOver(
    indices.map((c) => evoked[c][a]),
    indices.map((_, i) => i),
  );
}

/**
 * Whether a run's warning is a routine count (epochs rejected by the rules or by hand) rather than a problem: shown
 * in a neutral colour, not as a warning.
 */
export function isRoutineNotice(warning: string): boolean {
  return /^rejection "[^"]*": \d+ of \d+ epochs rejected/.test(warning);
}

/**
 * The shortest decimal within 4 ulps (4·ε relative) of `x`: undoes binary floating-point noise such as the grid time
 * −0.5 + 16/500 = −0.46799999999999997 → −0.468, without moving a value by anything a recipe could notice (grid
 * indices round half up with a tolerance of 8 ulps, rounding.ts); a value with real digits (1/3) keeps them.
 */
export function cleanNumber(x: number): number {
  if (!Number.isFinite(x) || Number.isInteger(x)) return x;
  for (let digits = 1; digits <= 17; digits++) {
    const v = Number(x.toPrecision(digits));
    if (Math.abs(v - x) <= 4 * Number.EPSILON * Math.abs(x)) return v;
  }
  return x;
}

function cleanDeep(value: unknown): unknown {
  if (typeof value === 'number') return cleanNumber(value);
  if (Array.isArray(value)) return value.map(cleanDeep);
  if (value !== null && typeof value === 'object') return Object.fromEntries(Object.entries(value).map(([k, v]) => [k, cleanDeep(v)]));
  return value;
}

/**
 * The recipe the Maps screen exports: the shown decomposition's recipe with the live baseline (snapped to the sample
 * grid, so the same grid points) and fit range, every number written as its shortest clean decimal.
 */
export function exportedRecipe(
  d: Decomposition,
  live: { baseline: { start: number; end: number }; method: BaselineMethod; scope: 'average' | 'trial'; spreadTrials: boolean; fitRange: readonly [number, number] },
): RecipeInput {
  const { baseline, method, scope, spreadTrials, fitRange } = live;
  const recipe = {
    ...d.recipe,
    baseline: { start: baseline.start, end: baseline.end, method, scope, ...(spreadTrials ? { spread: 'trials' as const } : {}) },
    aperiodic: { ...d.recipe.aperiodic, range: [fitRange[0], fitRange[1]] as [number, number] },
  };
  return cleanDeep(recipe) as RecipeInput;
}

const UNITS: Record<BaselineMethod, string> = { decibel: 'dB', 'percent-change': '%', 'z-score': 'z', 'power-ratio': 'ratio' };

/** A CSV field (RFC 4180): quoted when it holds a comma, quote or line break. */
function csvField(v: string | number): string {
  const s = typeof v === 'number' ? (Number.isFinite(v) ? String(cleanNumber(v)) : '') : v;
  return /[",\r\n]/.test(s) ? `"${s.replace(/"/g, '""')}"` : s;
}

/** Waits until the explorer worker's single trials under `key` are ready, or says why they are not. */
function heldReady(key: string): Promise<void> {
  return new Promise((resolve, reject) => {
    const check = (): boolean => {
      const hold = useResultsStore.getState().trialHold;
      if (hold === null || hold.key !== key) return (reject(new Error('another channel’s single trials were asked for meanwhile; export again')), true);
      if (hold.status === 'ready') return (resolve(), true);
      if (hold.status === 'failed') return (reject(new Error(hold.message ?? 'the single trials could not be kept')), true);
      return false;
    };
    if (check()) return;
    const stop = useResultsStore.subscribe(() => {
      if (check()) stop();
    });
  });
}

/**
 * Per-trial band × window values of one channel as a tidy CSV (one row per condition, trial, band and window), for
 * within-subject statistics: each trial's power normalized by its own baseline, averaged over the band's grid
 * frequencies and the window's grid times outside the edge zones (`trialBandValues`, computed in the explorer worker
 * from the channel's held single trials, Float32). Bands without a grid frequency or windows without a grid time give
 * empty values.
 */
export async function trialValuesCsv(
  d: Decomposition,
  channel: string,
  bands: readonly Band[],
  windows: readonly TimeWindow[],
  baseline: { start: number; end: number },
  points: { first: number; last: number },
  method: BaselineMethod,
): Promise<string> {
  const recording = useWorkspace.getState().recording;
  if (recording === null) throw new Error('open the recording on the Source screen first: single trials are computed from its samples');
  const key = `${d.key}|${channel}`;
  await ensureTrials(d, channel, recording);
  await heldReady(key);
  const cells = bands.flatMap((b) => windows.map((w) => ({ lowHz: b.lowHz, highHz: b.highHz, startSeconds: w.startSeconds, endSeconds: w.endSeconds })));
  const values = await explorerWorker().trialBandValues(key, d.frequencies, d.times, d.mask, points.first, points.last, method, cells);
  if (values === null) throw new Error('another channel’s single trials were asked for meanwhile; export again');
  const lines = ['channel,condition,trial,event_onset_s,band,band_low_hz,band_high_hz,window,window_start_s,window_end_s,method,baseline_start_s,baseline_end_s,value,unit'];
  d.labels.forEach((condition, c) => {
    const starts = d.epochStarts[c];
    for (let k = 0; k < d.trials[c]; k++) {
      const onset = starts[k] / d.sampleRateHz - d.epochStart;
      bands.forEach((b, bi) =>
        windows.forEach((w, wi) => {
          const v = values[c][bi * windows.length + wi][k];
          lines.push(
            [channel, condition, k + 1, onset, b.name, b.lowHz, b.highHz, w.name, w.startSeconds, w.endSeconds, method, baseline.start, baseline.end, v, UNITS[method]].map(csvField).join(','),
          );
        }),
      );
    }
  });
  return lines.join('\r\n') + '\r\n';
}
