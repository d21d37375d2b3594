// A second thread for single-trial-scope maps: holds a copy of the upper frequency rows of the explorer worker's
// trials and re-normalizes them while the explorer worker does the lower rows. Wiring only (renormalize.ts).
import * as Comlink from 'comlink';
import type { BaselineMethod, BaselineSpread } from '../src/lib/analysis/baseline';
import { prepareTrialPower, renormalizeTrials, type TrialPower } from '../src/lib/analysis/renormalize';

let held: { key: string; conditions: TrialPower[] } | null = null;

const api = {
  /** Keeps `trials[c]` (`[(k·R + r)·T + t]`, R of the rows) under `key`, replacing what was held. */
  hold(key: string, trials: Float32Array[], counts: number[], nRows: number, nTimes: number): void {
    held = { key, conditions: trials.map((t, c) => prepareTrialPower(t, counts[c], nRows, nTimes)) };
  },
  heldKey(): string | null {
    return held === null ? null : held.key;
  },
  /** The held rows' trial-scope maps of the conditions asked for (null for the others). */
  renormalize(key: string, first: number, last: number, method: BaselineMethod, spread: BaselineSpread, conditions: number[]): (Float64Array | null)[] | null {
    if (held === null || held.key !== key) return null;
    const out = held.conditions.map((tp, c) => {
      if (!conditions.includes(c)) return null;
      const o = new Float64Array(tp.nFreqs * tp.nTimes);
      renormalizeTrials(o, tp, first, last, method, spread);
      return o;
    });
    return Comlink.transfer(out, out.flatMap((o) => (o === null ? [] : [o.buffer])));
  },
};

export type TrialRowsWorkerApi = typeof api;
Comlink.expose(api);
