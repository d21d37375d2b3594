/**
 * The summary of one analysis run (format "tidemark-summary-1", `SummaryInput` in src/lib/schemas/review.ts): the
 * derived numbers the server may keep for review and pooling. Built from the same pieces `assembleResult` builds the
 * Result from — the plan and each channel's `ChannelAnalysis` — so the browser's worker pool and the command line
 * give the same summary. Pure (no zod, no DOM, no node:*): callers validate with `SummaryInput` before sending.
 *
 * What goes in, and nothing else: band, window, channel-group and condition labels, channel names, grid numbers and
 * values derived from power. The plan holds no header field, no file name and no sample, and neither does this.
 *
 * - Band values: per band × window × channel × condition, the mean over the band's grid frequencies and the
 *   window's grid times of the trial-averaged raw power (unit², e.g. µV²) and of the normalized map in the recipe's
 *   method and scope, leaving out edge-zone cells (analysis contract: closer than 3σ to either epoch edge) and
 *   undefined values (as the Bands screen does, `bandWindowMean`).
 * - Trial values (needs `ChannelAnalysis.singleTrials`): the same band × window mean of each trial's own
 *   normalized power — each trial's rows normalized by that trial's own baseline (the contract's trial scope, per
 *   trial, before averaging), in the recipe's method. One row per band × window × channel × condition, trials in
 *   epoch order.
 * - Aperiodic: per channel and condition, the fit of that condition's epochs (`aperiodicByCondition`, spectrum
 *   source "epochs"); with source "recording" there is one fit per channel, and each condition carries it
 *   (a notice says so).
 * - Maps: per condition, the normalized map averaged over a named channel group's channels, cells averaged in
 *   blocks of neighbouring frequencies and times down to at most 64 × 128; edge-zone cells are left out of the
 *   blocks and a block with none left is null.
 * Every value is rounded to 7 significant digits (`toPrecision`, exactly specified by ECMAScript, so every engine
 * writes the same text; the samples themselves are float32, about 7 digits). NaN and ±Infinity become null.
 */
import { edgeMask, edgeZones } from './edge-zone';
import type { ChannelAnalysis, RecipePlan } from './analyze-channel';
import type { AperiodicFit } from './aperiodic';
import { baselineStats, normalizeValue, type BaselineMethod } from './baseline';
import { AnalysisInputError } from './errors';

export const SUMMARY_FORMAT = 'tidemark-summary-1';

/** Caps the server checks (`SUMMARY_CAPS` in src/lib/schemas/review.ts; repeated here so the core needs no zod). */
export const SUMMARY_LIMITS = { bands: 16, windows: 16, channelGroups: 32, trialsPerRow: 1_000, trialValuesTotal: 50_000, trialRows: 4_096, mapFrequencies: 64, mapTimes: 128 } as const;

export interface SummaryBand {
  label: string;
  lowHz: number;
  highHz: number;
}
export interface SummaryWindow {
  label: string;
  startS: number;
  endS: number;
}
export interface SummaryChannelGroup {
  label: string;
  channels: string[];
}

/** Common-practice EEG bands (theta 4–8, alpha 8–13, beta 13–30, gamma 30–45 Hz), as the Bands screen starts. */
export const DEFAULT_SUMMARY_BANDS: SummaryBand[] = [
  { label: 'theta', lowHz: 4, highHz: 8 },
  { label: 'alpha', lowHz: 8, highHz: 13 },
  { label: 'beta', lowHz: 13, highHz: 30 },
  { label: 'gamma', lowHz: 30, highHz: 45 },
];
/** The Bands screen's starting windows, seconds after the event. */
export const DEFAULT_SUMMARY_WINDOWS: SummaryWindow[] = [
  { label: 'early', startS: 0.1, endS: 0.5 },
  { label: 'late', startS: 0.5, endS: 1.0 },
];
/** The default channel group: every analysed channel. */
export const ALL_CHANNELS_GROUP = 'all';

/** What the summary is taken over; every part optional. */
export interface SummarySpec {
  /** Default `DEFAULT_SUMMARY_BANDS`, less those without a grid frequency. */
  bands?: SummaryBand[];
  /** Default `DEFAULT_SUMMARY_WINDOWS`, less those without a grid time. */
  windows?: SummaryWindow[];
  /** Default one group, "all", of every analysed channel. */
  channelGroups?: SummaryChannelGroup[];
  /** The group the reduced maps average over; default the first group. */
  mapGroup?: string;
  /** Channels that get per-trial values; default every analysed channel. */
  trialChannels?: string[];
}

export interface SummaryBandValue {
  band: string;
  window: string;
  channel: string;
  condition: string;
  raw: number | null;
  normalized: number | null;
}
export interface SummaryTrialValues {
  band: string;
  window: string;
  channel: string;
  condition: string;
  values: (number | null)[];
}
export interface SummaryAperiodic {
  channel: string;
  condition: string;
  offset: number | null;
  exponent: number | null;
  knee: number | null;
  r2: number | null;
  rmse: number | null;
}
export interface SummaryMap {
  condition: string;
  channelGroup: string;
  frequenciesHz: number[];
  timesS: number[];
  values: (number | null)[][];
}

/** The shape of `SummaryInput` (src/lib/schemas/review.ts). */
export interface Summary {
  format: typeof SUMMARY_FORMAT;
  normalizedUnit: BaselineMethod;
  bands: SummaryBand[];
  windows: SummaryWindow[];
  conditions: string[];
  channels: string[];
  channelGroups: SummaryChannelGroup[];
  bandValues: SummaryBandValue[];
  trialValues: SummaryTrialValues[];
  aperiodic: SummaryAperiodic[];
  maps: SummaryMap[];
}

/** A channel's share of the summary (`summarizeChannel`); small, so a worker can send it and drop the trials. */
export interface ChannelSummary {
  channel: string;
  bandValues: SummaryBandValue[];
  trialValues: SummaryTrialValues[];
  aperiodic: SummaryAperiodic[];
  /** Per condition, the normalized map `[f·T + t]` when the channel is in the map group, else null. */
  mapNormalized: Float64Array[] | null;
}

/** The summary's resolved choices for one plan (`resolveSummarySpec`), shared by every channel. */
export interface ResolvedSummarySpec {
  bands: SummaryBand[];
  windows: SummaryWindow[];
  channelGroups: SummaryChannelGroup[];
  mapGroup: SummaryChannelGroup;
  trialChannels: Set<string>;
  /** Per band, per window: the grid indices inside. */
  bandRows: number[][];
  windowCols: number[][];
  /** `[f·T + t]` = 1 inside an edge zone. */
  edge: Uint8Array;
  notices: string[];
}

const EPS = 1e-9;

/** `x` rounded to 7 significant digits, or null when not finite. */
export function summaryValue(x: number): number | null {
  return Number.isFinite(x) ? Number(x.toPrecision(7)) : null;
}

function indicesWithin(grid: ArrayLike<number>, lo: number, hi: number): number[] {
  const out: number[] = [];
  for (let i = 0; i < grid.length; i++) if (grid[i] >= lo - EPS && grid[i] <= hi + EPS) out.push(i);
  return out;
}

/**
 * Checks a spec against the plan and fills in the defaults. Throws AnalysisInputError naming the field
 * (`summary.bands[1]`, `summary.channelGroups[0].channels[2]`, `summary.trialValues`) for anything it cannot use.
 */
export function resolveSummarySpec(plan: RecipePlan, spec: SummarySpec = {}): ResolvedSummarySpec {
  const notices: string[] = [];
  const freqs = plan.frequencies;
  const times = plan.times;
  const given = (x: unknown[] | undefined) => x !== undefined;

  const bandsIn = spec.bands ?? DEFAULT_SUMMARY_BANDS;
  if (bandsIn.length > SUMMARY_LIMITS.bands) throw new AnalysisInputError('summary.bands', `lists ${bandsIn.length} bands; at most ${SUMMARY_LIMITS.bands}`);
  const bands: SummaryBand[] = [];
  const bandRows: number[][] = [];
  bandsIn.forEach((b, i) => {
    if (!(b.highHz > b.lowHz)) throw new AnalysisInputError(`summary.bands[${i}]`, `"${b.label}": highHz must be above lowHz (${b.lowHz}–${b.highHz} Hz)`);
    const rows = indicesWithin(freqs, b.lowHz, b.highHz);
    if (rows.length === 0) {
      if (given(spec.bands)) throw new AnalysisInputError(`summary.bands[${i}]`, `"${b.label}" (${b.lowHz}–${b.highHz} Hz) holds none of the recipe's frequencies (${summaryValue(freqs[0])}–${summaryValue(freqs[freqs.length - 1])} Hz)`);
      notices.push(`summary: band "${b.label}" (${b.lowHz}–${b.highHz} Hz) is left out: none of the recipe's frequencies lies in it`);
      return;
    }
    bands.push({ ...b });
    bandRows.push(rows);
  });
  const windowsIn = spec.windows ?? DEFAULT_SUMMARY_WINDOWS;
  if (windowsIn.length > SUMMARY_LIMITS.windows) throw new AnalysisInputError('summary.windows', `lists ${windowsIn.length} windows; at most ${SUMMARY_LIMITS.windows}`);
  const windows: SummaryWindow[] = [];
  const windowCols: number[][] = [];
  windowsIn.forEach((w, i) => {
    if (!(w.endS > w.startS)) throw new AnalysisInputError(`summary.windows[${i}]`, `"${w.label}": endS must be after startS (${w.startS}–${w.endS} s)`);
    const cols = indicesWithin(times, w.startS, w.endS);
    if (cols.length === 0) {
      if (given(spec.windows)) throw new AnalysisInputError(`summary.windows[${i}]`, `"${w.label}" (${w.startS}–${w.endS} s) holds none of the epoch's times`);
      notices.push(`summary: window "${w.label}" (${w.startS}–${w.endS} s) is left out: it lies outside the epoch`);
      return;
    }
    windows.push({ ...w });
    windowCols.push(cols);
  });

  const known = new Set(plan.channels);
  const channelGroups = (spec.channelGroups ?? [{ label: ALL_CHANNELS_GROUP, channels: plan.channels.slice() }]).map((g) => ({ label: g.label, channels: g.channels.slice() }));
  if (channelGroups.length === 0) throw new AnalysisInputError('summary.channelGroups', 'must name at least one group (the maps are averaged over one)');
  if (channelGroups.length > SUMMARY_LIMITS.channelGroups) throw new AnalysisInputError('summary.channelGroups', `lists ${channelGroups.length} groups; at most ${SUMMARY_LIMITS.channelGroups}`);
  channelGroups.forEach((g, i) => {
    if (g.channels.length === 0) throw new AnalysisInputError(`summary.channelGroups[${i}]`, `"${g.label}" must list at least one channel`);
    g.channels.forEach((c, j) => {
      if (!known.has(c)) throw new AnalysisInputError(`summary.channelGroups[${i}].channels[${j}]`, `"${c}" is not an analysed channel (${plan.channels.slice(0, 12).join(', ')}${plan.channels.length > 12 ? ', …' : ''})`);
    });
  });
  const mapGroup = spec.mapGroup === undefined ? channelGroups[0] : channelGroups.find((g) => g.label === spec.mapGroup);
  if (mapGroup === undefined) throw new AnalysisInputError('summary.mapGroup', `"${spec.mapGroup}" is not one of the channel groups (${channelGroups.map((g) => g.label).join(', ')})`);

  const trialChannels = new Set(spec.trialChannels ?? plan.channels);
  (spec.trialChannels ?? []).forEach((c, i) => {
    if (!known.has(c)) throw new AnalysisInputError(`summary.trialChannels[${i}]`, `"${c}" is not an analysed channel`);
  });
  const maxTrials = Math.max(0, ...plan.epochStarts.map((s) => s.length));
  if (maxTrials > SUMMARY_LIMITS.trialsPerRow) {
    throw new AnalysisInputError('summary.trialValues', `would hold ${maxTrials} trials in one row; at most ${SUMMARY_LIMITS.trialsPerRow}`);
  }
  const trialsAll = plan.epochStarts.reduce((n, s) => n + s.length, 0);
  const rowsPerChannel = bands.length * windows.length * plan.labels.length;
  const total = bands.length * windows.length * trialChannels.size * trialsAll;
  if (total > SUMMARY_LIMITS.trialValuesTotal || rowsPerChannel * trialChannels.size > SUMMARY_LIMITS.trialRows) {
    throw new AnalysisInputError(
      'summary.trialValues',
      `would hold ${total} per-trial values (${bands.length} bands × ${windows.length} windows × ${trialChannels.size} channels × ${trialsAll} trials) in ${rowsPerChannel * trialChannels.size} rows; at most ${SUMMARY_LIMITS.trialValuesTotal} values in ${SUMMARY_LIMITS.trialRows} rows: name fewer channels in summary.trialChannels, or fewer bands or windows`,
    );
  }
  if (plan.spectrum.conditionSpans === null && plan.labels.length > 1) {
    notices.push('summary: spectrum.source is "recording", so every condition carries the whole recording\'s aperiodic fit');
  }
  return { bands, windows, channelGroups, mapGroup, trialChannels, bandRows, windowCols, edge: edgeMask(edgeZones(plan.edgeSeconds, plan.sampleRateHz, times.length), times.length), notices };
}

/** Mean of `values[f·T + t]` over rows × cols outside the edge zones, finite values only; NaN when none. */
function cellMean(values: ArrayLike<number>, offset: number, nt: number, rows: number[], cols: number[], edge: Uint8Array): number {
  let sum = 0;
  let n = 0;
  for (const f of rows) {
    for (const t of cols) {
      if (edge[f * nt + t] !== 0) continue;
      const v = values[offset + f * nt + t];
      if (!Number.isFinite(v)) continue;
      sum += v;
      n++;
    }
  }
  return n > 0 ? sum / n : NaN;
}

function fitOf(channel: string, condition: string, fit: AperiodicFit): SummaryAperiodic {
  return {
    channel,
    condition,
    offset: summaryValue(fit.offset),
    exponent: summaryValue(fit.exponent),
    knee: fit.knee === null ? null : summaryValue(fit.knee),
    r2: summaryValue(fit.r2),
    rmse: summaryValue(fit.rmse),
  };
}

/**
 * One channel's share of the summary, from its `ChannelAnalysis` (`i`: its index in the plan). Per-trial values
 * need `analysis.singleTrials` (ask `analyzeChannel` for them) when the channel is among the spec's trial channels.
 */
export function summarizeChannel(plan: RecipePlan, i: number, analysis: ChannelAnalysis, spec: ResolvedSummarySpec): ChannelSummary {
  const channel = plan.channels[i];
  const nf = plan.frequencies.length;
  const nt = plan.times.length;
  const { bands, windows, bandRows, windowCols, edge } = spec;
  const bandValues: SummaryBandValue[] = [];
  const trialValues: SummaryTrialValues[] = [];
  const wantTrials = spec.trialChannels.has(channel);
  if (wantTrials && analysis.singleTrials === null) {
    throw new AnalysisInputError('summary.trialValues', `need channel "${channel}"'s single trials; run it with singleTrials`);
  }
  const { first, last } = plan.baseline;
  const method = plan.baseline.method;
  plan.labels.forEach((condition, c) => {
    bands.forEach((band, b) => {
      windows.forEach((window, w) => {
        bandValues.push({
          band: band.label,
          window: window.label,
          channel,
          condition,
          raw: summaryValue(cellMean(analysis.power[c], 0, nt, bandRows[b], windowCols[w], edge)),
          normalized: summaryValue(cellMean(analysis.normalized[c], 0, nt, bandRows[b], windowCols[w], edge)),
        });
      });
    });
    if (!wantTrials) return;
    // Each trial's rows normalized by its own baseline, only the band rows the summary reads.
    const trials = analysis.singleTrials![c];
    const K = plan.epochStarts[c].length;
    const rowsNeeded = [...new Set(bandRows.flat())];
    const normalizedTrial = new Float64Array(nf * nt);
    const perTrial: number[][][] = bands.map(() => windows.map(() => new Array<number>(K)));
    for (let k = 0; k < K; k++) {
      const base = k * nf * nt;
      for (const f of rowsNeeded) {
        const off = base + f * nt;
        const stats = baselineStats(trials, off, first, last);
        for (let t = 0; t < nt; t++) normalizedTrial[f * nt + t] = normalizeValue(method, trials[off + t], stats.mean, stats.sd);
      }
      bands.forEach((_, b) => windows.forEach((_, w) => {
        perTrial[b][w][k] = cellMean(normalizedTrial, 0, nt, bandRows[b], windowCols[w], edge);
      }));
    }
    bands.forEach((band, b) => windows.forEach((window, w) => {
      trialValues.push({ band: band.label, window: window.label, channel, condition, values: perTrial[b][w].map(summaryValue) });
    }));
  });
  const aperiodic = plan.labels.map((condition, c) => fitOf(channel, condition, analysis.aperiodicByCondition?.[c] ?? analysis.aperiodic));
  const mapNormalized = spec.mapGroup.channels.includes(channel) ? analysis.normalized.map((m) => Float64Array.from(m)) : null;
  return { channel, bandValues, trialValues, aperiodic, mapNormalized };
}

/** Consecutive index blocks of at most ceil(n / max) each, so there are at most `max` blocks. */
function blocks(n: number, max: number): [number, number][] {
  const size = Math.ceil(n / max);
  const out: [number, number][] = [];
  for (let s = 0; s < n; s += size) out.push([s, Math.min(n, s + size)]);
  return out;
}

function mean(xs: ArrayLike<number>, from: number, to: number): number {
  let s = 0;
  for (let i = from; i < to; i++) s += xs[i];
  return s / (to - from);
}

/** Puts the channels' shares together, in plan channel order (band values grouped by channel as they come). */
export function combineSummary(plan: RecipePlan, parts: ChannelSummary[], spec: ResolvedSummarySpec): Summary {
  const nf = plan.frequencies.length;
  const nt = plan.times.length;
  const fBlocks = blocks(nf, SUMMARY_LIMITS.mapFrequencies);
  const tBlocks = blocks(nt, SUMMARY_LIMITS.mapTimes);
  const inGroup = parts.filter((p) => p.mapNormalized !== null);
  const maps: SummaryMap[] = plan.labels.map((condition, c) => {
    const values = fBlocks.map(([f0, f1]) =>
      tBlocks.map(([t0, t1]) => {
        let sum = 0;
        let n = 0;
        for (const p of inGroup) {
          const m = p.mapNormalized![c];
          for (let f = f0; f < f1; f++) {
            for (let t = t0; t < t1; t++) {
              if (spec.edge[f * nt + t] !== 0) continue;
              const v = m[f * nt + t];
              if (!Number.isFinite(v)) continue;
              sum += v;
              n++;
            }
          }
        }
        return n > 0 ? summaryValue(sum / n) : null;
      }),
    );
    return {
      condition,
      channelGroup: spec.mapGroup.label,
      frequenciesHz: fBlocks.map(([a, b]) => summaryValue(mean(plan.frequencies, a, b))!),
      timesS: tBlocks.map(([a, b]) => summaryValue(mean(plan.times, a, b))!),
      values,
    };
  });
  return {
    format: SUMMARY_FORMAT,
    normalizedUnit: plan.baseline.method,
    bands: spec.bands.map((b) => ({ ...b })),
    windows: spec.windows.map((w) => ({ ...w })),
    conditions: plan.labels.slice(),
    channels: plan.channels.slice(),
    channelGroups: spec.channelGroups.map((g) => ({ label: g.label, channels: g.channels.slice() })),
    bandValues: parts.flatMap((p) => p.bandValues),
    trialValues: parts.flatMap((p) => p.trialValues),
    aperiodic: parts.flatMap((p) => p.aperiodic),
    maps,
  };
}

/**
 * The whole summary from a run kept in memory: `channels` as `analyzeChannel` returned them, in plan order, with
 * single trials for the trial channels. Returns the summary and the notices about defaults left out.
 */
export function buildSummary(plan: RecipePlan, channels: ChannelAnalysis[], spec: SummarySpec = {}): { summary: Summary; notices: string[] } {
  const resolved = resolveSummarySpec(plan, spec);
  const parts = channels.map((ch, i) => summarizeChannel(plan, i, ch, resolved));
  return { summary: combineSummary(plan, parts, resolved), notices: resolved.notices };
}
