// The explorer's worker: holds one channel's single-trial power for live trial-scope re-normalization, and refits
// the aperiodic model for a dragged fit range. Wiring only; the maths is in src/lib/analysis (renormalize.ts,
// aperiodic.ts).
import * as Comlink from 'comlink';
import type { BaselineMethod, BaselineSpread } from '../src/lib/analysis/baseline';
import { prepareTrialPower, renormalizeTrials, type TrialPower } from '../src/lib/analysis/renormalize';
import { trialBandValues, type TrialBandWindow } from '../src/lib/analysis/trial-band-values';
import { fitAperiodicEach, type AperiodicModel } from '../src/lib/analysis/aperiodic';

let held: { key: string; conditions: TrialPower[] } | null = null;

const api = {
  /** Keeps `trials[c]` (per condition, `[(k·F + f)·T + t]` µV²) under `key`, replacing what was held. */
  holdTrials(key: string, trials: Float32Array[], counts: number[], nFreqs: number, nTimes: number): void {
    held = { key, conditions: trials.map((t, c) => prepareTrialPower(t, counts[c], nFreqs, nTimes)) };
  },
  heldKey(): string | null {
    return held === null ? null : held.key;
  },
  /** Trial-scope normalized maps, one per condition, for baseline points first … last. */
  renormalize(key: string, first: number, last: number, method: BaselineMethod, spread: BaselineSpread = 'time'): Float64Array[] | null {
    if (held === null || held.key !== key) return null;
    const out = held.conditions.map((tp) => {
      const o = new Float64Array(tp.nFreqs * tp.nTimes);
      renormalizeTrials(o, tp, first, last, method, spread);
      return o;
    });
    return Comlink.transfer(out, out.map((o) => o.buffer));
  },
  /** Per condition, per band × window cell, each held trial's own-baseline value (`trialBandValues`); null if another channel is held. */
  trialBandValues(key: string, frequencies: Float64Array, times: Float64Array, mask: Uint8Array, first: number, last: number, method: BaselineMethod, cells: TrialBandWindow[]): Float64Array[][] | null {
    if (held === null || held.key !== key) return null;
    return held.conditions.map((tp) => trialBandValues(tp.trials, tp.count, frequencies, times, mask, first, last, method, cells));
  },
  /** The aperiodic fit of each spectrum over `rangeHz` with `model` (the core's one model), or why it failed. */
  fitEach(spectra: { frequencies: Float64Array; psd: Float64Array }[], rangeHz: [number, number], model: AperiodicModel) {
    return fitAperiodicEach(spectra, rangeHz, model);
  },
};

export type ExplorerWorkerApi = typeof api;
Comlink.expose(api);
