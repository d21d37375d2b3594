import Papa from 'papaparse';
import type { BaselineMethod } from '../../analysis/baseline';
import type { ChannelGroup } from '../../analysis/channel-groups';
import type { BandRow } from './band-summary';
import type { Decomposition } from './results';

/** The sites a person picked for the Bands chart, and the recording they were picked on. */
export interface ChartChoice {
  recordingId: string;
  sites: string[];
}

/**
 * The channels and groups the Bands chart shows for decomposition `d`: the ones picked on this recording that `d`
 * still has, else `fallback` (the view's channel). A choice made on another recording is not carried over.
 */
export function chartSitesOf(choice: ChartChoice | null, d: Pick<Decomposition, 'recordingId' | 'channels'>, groups: readonly ChannelGroup[], fallback: string): string[] {
  if (choice === null || choice.recordingId !== d.recordingId) return [fallback];
  const known = new Set([...d.channels, ...groups.map((g) => g.name)]);
  const sites = choice.sites.filter((s) => known.has(s));
  return sites.length > 0 ? sites : [fallback];
}

/** The band summary as CSV (one row per band, window, channel and condition), with the method and baseline it used. */
export function bandSummaryCsv(rows: readonly BandRow[], method: BaselineMethod, unit: string, baseline: { start: number; end: number }): string {
  return (
    Papa.unparse({
      fields: ['band', 'band_low_hz', 'band_high_hz', 'window', 'window_start_s', 'window_end_s', 'channel', 'condition', 'method', 'scope', 'baseline_start_s', 'baseline_end_s', 'value', 'unit', 'cells'],
      data: rows.map((r) => [r.band.name, r.band.lowHz, r.band.highHz, r.window.name, r.window.startSeconds, r.window.endSeconds, r.channel, r.condition, method, 'average', baseline.start, baseline.end, Number.isFinite(r.value) ? r.value : '', unit, r.cells]),
    }) + '\n'
  );
}
