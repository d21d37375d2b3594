import { baselinePointsIn, type BaselineMethod } from '../../lib/analysis/baseline';
import { baselineEdgeOverlap } from '../../lib/analysis/edge-zone';
import { renormalizeAverage } from '../../lib/analysis/renormalize';
import type { Decomposition } from '../../lib/client/workspace/results';

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

/** Trial-averaged normalized map of one condition in average scope, into a reused buffer. */
export function averageNormalized(out: Float64Array, power: Float64Array, nTimes: number, points: { first: number; last: number }, method: BaselineMethod): Float64Array {
  renormalizeAverage(out, power, nTimes, points.first, points.last, method);
  return out;
}

/** out = a − b, element-wise. */
export function difference(out: Float64Array, a: ArrayLike<number>, b: ArrayLike<number>): Float64Array {
  for (let i = 0; i < out.length; i++) out[i] = a[i] - b[i];
  return out;
}
