import * as Comlink from 'comlink';
import { create } from 'zustand';
import type { BaselineMethod, BaselineSpread } from '../../analysis/baseline';
import type { TrialRowsWorkerApi } from '../../../../workers/trial-rows.worker';
import { explorerWorker } from '../explorer-worker';

/** Which normalized maps: the held trials (`key`: decomposition key and channel), baseline points, method, spread. */
export interface TrialMapsJob {
  key: string;
  first: number;
  last: number;
  method: BaselineMethod;
  spread: BaselineSpread;
  /** The conditions whose maps are made (A, and B of A − B). */
  conditions: number[];
  /** Frequency rows of a map (the upper half is made on a second thread). */
  nFreqs: number;
}

export interface TrialMaps extends TrialMapsJob {
  /** One normalized map per condition asked for (`[f·T + t]`), null for the others. */
  maps: (Float64Array | null)[];
}

/** The latest single-trial-scope maps the explorer worker made (read with a selector; a new answer repaints). */
export const useTrialMaps = create<{ latest: TrialMaps | null }>(() => ({ latest: null }));

let busy = false;
let next: TrialMapsJob | null = null;

/**
 * Asks the explorer worker for trial-scope maps (it holds the channel's trials). Latest wins: while one answer is
 * under way only the newest request waits, so a baseline drag never queues up stale work. The answer goes into
 * `useTrialMaps`, whose subscribers render synchronously (useSyncExternalStore), so the measure from the input to
 * the painted canvas stays in one task without forcing React to flush.
 */
export function requestTrialMaps(job: TrialMapsJob): void {
  next = job;
  if (!busy) void pump();
}

async function pump(): Promise<void> {
  busy = true;
  try {
    while (next !== null) {
      const job = next;
      next = null;
      const maps = await renormalize(job);
      if (maps !== null) useTrialMaps.setState({ latest: { ...job, maps } });
    }
  } finally {
    busy = false;
  }
}

let helper: Comlink.Remote<TrialRowsWorkerApi> | null = null;
let helperKey: string | null = null;

/**
 * The row where a second worker takes over, after handing it a copy of the upper rows of `key`'s trials (once per
 * held channel: half the trials' memory again); null to make the whole map in the explorer worker.
 */
async function splitRow(key: string, nFreqs: number): Promise<number | null> {
  const h = Math.floor(nFreqs / 2);
  if (typeof Worker === 'undefined' || h < 1) return null;
  if (helperKey !== key) {
    helperKey = null;
    const copy = await explorerWorker().rowsOf(key, h, nFreqs);
    if (copy === null) return null;
    helper ??= Comlink.wrap<TrialRowsWorkerApi>(new Worker(new URL('../../../../workers/trial-rows.worker.ts', import.meta.url), { type: 'module' }));
    await helper.hold(key, Comlink.transfer(copy.trials, copy.trials.map((t) => t.buffer)), copy.counts, nFreqs - h, copy.nTimes);
    helperKey = key;
  }
  return h;
}

/**
 * One job's maps. z-scores over time (a weighted sum over every trial's stored row) are split by frequency rows
 * over the explorer worker and a second worker, which run at once on two cores. The rest stay in one worker:
 * decibels (one subtraction per cell after precomputed logarithms), percent change and power ratio (weighted sums
 * of the trials' coarse samples, S_f per trial and frequency, then one interpolation per frequency) and
 * across-trials z-scores.
 */
async function renormalize(job: TrialMapsJob): Promise<(Float64Array | null)[] | null> {
  const split = job.method === 'z-score' && job.spread === 'time' ? await splitRow(job.key, job.nFreqs) : null;
  if (split === null || helper === null) return explorerWorker().renormalize(job.key, job.first, job.last, job.method, job.spread, job.conditions);
  const [lower, upper] = await Promise.all([
    explorerWorker().renormalize(job.key, job.first, job.last, job.method, job.spread, job.conditions, [0, split]),
    helper.renormalize(job.key, job.first, job.last, job.method, job.spread, job.conditions),
  ]);
  if (lower === null) return null;
  if (upper === null) {
    helperKey = null;
    return explorerWorker().renormalize(job.key, job.first, job.last, job.method, job.spread, job.conditions);
  }
  return lower.map((m, c) => {
    const u = upper[c];
    if (m !== null && u !== null) m.set(u, m.length - u.length);
    return m;
  });
}
