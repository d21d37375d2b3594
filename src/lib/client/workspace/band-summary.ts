import type { BaselineMethod } from '../../analysis/baseline';
import { bandProblem, summarizeBands, windowProblem, type BandSummaryRow } from '../../analysis/band-summary';
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
