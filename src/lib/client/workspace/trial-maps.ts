import { create } from 'zustand';
import type { BaselineMethod, BaselineSpread } from '../../analysis/baseline';
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
      const maps = await explorerWorker().renormalize(job.key, job.first, job.last, job.method, job.spread, job.conditions);
      if (maps !== null) useTrialMaps.setState({ latest: { ...job, maps } });
    }
  } finally {
    busy = false;
  }
}
