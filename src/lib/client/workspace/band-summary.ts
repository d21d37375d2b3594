import type { BaselineMethod } from '../../analysis/baseline';
import { bandProblem, bandWindowMean, summarizeBands, windowProblem, type BandSummaryRow } from '../../analysis/band-summary';
import { defaultChannelGroups, type ChannelGroup } from '../../analysis/channel-groups';
import { BudgetCache } from './cache-budget';
import type { Decomposition } from './results';
import type { Band, TimeWindow } from './view';

export type BandRow = BandSummaryRow<Band, TimeWindow>;

// Rows are small (channels × conditions × bands × windows objects); a few hundred summaries fit easily.
const summaries = new BudgetCache<BandRow[]>(4 * 1024 * 1024, (rows) => rows.length * 96);

/** Why the bands or windows cannot be summarized on this decomposition (one line each); empty when they can. */
export function bandSummaryProblems(d: Decomposition, bands: readonly Band[], windows: readonly TimeWindow[]): string[] {
  return [...bands.map((b) => bandProblem(b, d.frequencies)), ...windows.map((w) => windowProblem(w, d.times))].filter((p): p is string => p !== null);
}

/**
 * The band × window summary of decomposition `d` for the live baseline points and method (the core's `summarizeBands`),
 * remembered per decomposition, bands, windows, baseline points and method under a small budget.
 */
export function bandSummary(d: Decomposition, bands: readonly Band[], windows: readonly TimeWindow[], points: { first: number; last: number }, method: BaselineMethod): BandRow[] {
  const key = JSON.stringify([d.key, bands, windows, points.first, points.last, method]);
  const hit = summaries.get(key);
  if (hit !== undefined) return hit;
  const rows = summarizeBands(d, points, method, bands, windows);
  summaries.set(key, rows);
  return rows;
}

/** A row of the Bands screen's table: one channel, or one channel group (the mean of its channels' values). */
export interface BandTableRow {
  band: Band;
  window: TimeWindow;
  /** A channel name, or a group's name. */
  site: string;
  kind: 'channel' | 'group';
  condition: string;
  /** Normalized power in the method's unit. For a group: the mean of its channels' finite values. */
  value: number;
  /** Inter-trial phase consistency (0 … 1) the same way, when the run has it; else null. */
  itpc: number | null;
  /** Map cells averaged (a channel), or channels averaged (a group). */
  count: number;
}

/** The channel groups of a decomposition: the recipe's `channelGroups`, else the default regions its channels allow. */
export function channelGroupsOf(d: Decomposition): ChannelGroup[] {
  const own = d.recipe.channelGroups;
  if (own !== undefined && Object.keys(own).length > 0) return Object.entries(own).map(([name, channels]) => ({ name, channels: channels.filter((c) => d.channels.includes(c)) })).filter((g) => g.channels.length > 0);
  return defaultChannelGroups(d.channels);
}

const itpcSummaries = new BudgetCache<BandRow[]>(4 * 1024 * 1024, (rows) => rows.length * 96);

/**
 * Band × window means of inter-trial phase consistency (no baseline: it is already on 0 … 1), the core's
 * `bandWindowMean` over each channel's and condition's map, edge-zone cells left out; null when the run has none.
 */
export function itpcBandSummary(d: Decomposition, bands: readonly Band[], windows: readonly TimeWindow[]): BandRow[] | null {
  if (d.itpc === null) return null;
  const key = JSON.stringify([d.key, bands, windows]);
  const hit = itpcSummaries.get(key);
  if (hit !== undefined) return hit;
  const rows: BandRow[] = [];
  d.channels.forEach((channel, c) => {
    d.labels.forEach((condition, k) => {
      for (const band of bands) {
        for (const window of windows) {
          const { mean, cells } = bandWindowMean(d.itpc![c][k], d.frequencies, d.times, d.mask, band.lowHz, band.highHz, window.startSeconds, window.endSeconds);
          rows.push({ band, window, channel, condition, value: mean, cells });
        }
      }
    });
  });
  itpcSummaries.set(key, rows);
  return rows;
}

/**
 * The table's rows: every channel row of `rows` (with its ITPC beside it), then per group, band, window and condition
 * the mean of its channels' finite values (`count` = how many were averaged; none gives NaN).
 */
export function bandTableRows(rows: readonly BandRow[], itpc: readonly BandRow[] | null, groups: readonly ChannelGroup[]): BandTableRow[] {
  // Rows come in channel, condition, band, window order, and so do the ITPC rows: the same index is the same cell.
  const out: BandTableRow[] = rows.map((r, i) => ({ band: r.band, window: r.window, site: r.channel, kind: 'channel', condition: r.condition, value: r.value, itpc: itpc === null ? null : itpc[i].value, count: r.cells }));
  const byCell = new Map<string, BandTableRow[]>();
  const cellKey = (r: { band: Band; window: TimeWindow; condition: string }, site: string) => `${r.band.name}\u0000${r.window.name}\u0000${r.condition}\u0000${site}`;
  for (const r of out) byCell.set(cellKey(r, r.site), [r]);
  const mean = (xs: (number | null)[]) => {
    const finite = xs.filter((v): v is number => v !== null && Number.isFinite(v));
    return { value: finite.length > 0 ? finite.reduce((a, b) => a + b, 0) / finite.length : NaN, n: finite.length };
  };
  const first = out.filter((r) => r.site === out[0]?.site);
  for (const g of groups) {
    for (const template of first) {
      const members = g.channels.map((c) => byCell.get(cellKey(template, c))?.[0]).filter((r): r is BandTableRow => r !== undefined);
      const v = mean(members.map((m) => m.value));
      const p = itpc === null ? null : mean(members.map((m) => m.itpc)).value;
      out.push({ band: template.band, window: template.window, site: g.name, kind: 'group', condition: template.condition, value: v.value, itpc: p, count: v.n });
    }
  }
  return out;
}
