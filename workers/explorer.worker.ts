// The explorer's worker: holds one channel's single-trial power for live trial-scope re-normalization, and refits
// the aperiodic model for a dragged fit range. Wiring only; the maths is in src/lib/analysis (renormalize.ts,
// aperiodic.ts).
import * as Comlink from 'comlink';
import type { BaselineMethod, BaselineSpread } from '../src/lib/analysis/baseline';
import type { CoarseTrials } from '../src/lib/analysis/decompose';
import { copyRows, prepareTrialPower, renormalizeTrials, type CoarseRows, type TrialPower } from '../src/lib/analysis/renormalize';
import { trialBandValues, type TrialBandWindow } from '../src/lib/analysis/trial-band-values';
import { fitAperiodicEach, type AperiodicModel } from '../src/lib/analysis/aperiodic';

let held: { key: string; conditions: TrialPower[] } | null = null;

const api = {
  /**
   * Keeps `trials[c]` (per condition, `[(k·F + f)·T + t]` µV²) under `key`, replacing what was held, with their
   * coarse samples when given (percent change and power ratio then re-normalize from those).
   */
  holdTrials(key: string, trials: Float32Array[], counts: number[], nFreqs: number, nTimes: number, coarse: CoarseTrials | null = null): void {
    const rowsOf = (c: number): CoarseRows | null => (coarse === null || coarse.samples[c] === undefined ? null : { ...coarse, samples: coarse.samples[c] });
    held = { key, conditions: trials.map((t, c) => prepareTrialPower(t, counts[c], nFreqs, nTimes, rowsOf(c))) };
  },
  heldKey(): string | null {
    return held === null ? null : held.key;
  },
  /** Trial-scope normalized maps of the conditions asked for (null for the others), baseline points first … last. */
  renormalize(
    key: string,
    first: number,
    last: number,
    method: BaselineMethod,
    spread: BaselineSpread = 'time',
    conditions: number[] | null = null,
    rows: [number, number] | null = null,
  ): (Float64Array | null)[] | null {
    if (held === null || held.key !== key) return null;
    const out = held.conditions.map((tp, c) => {
      if (conditions !== null && !conditions.includes(c)) return null;
      const o = new Float64Array(tp.nFreqs * tp.nTimes);
      renormalizeTrials(o, tp, first, last, method, spread, rows);
      return o;
    });
    return Comlink.transfer(out, out.flatMap((o) => (o === null ? [] : [o.buffer])));
  },
  /** Copies of the held trials' frequency rows from … to − 1 (`[(k·R + r)·T + t]`), for a second thread to share the work. */
  rowsOf(key: string, from: number, to: number): { trials: Float32Array[]; counts: number[]; nTimes: number } | null {
    if (held === null || held.key !== key) return null;
    const out = held.conditions.map((tp) => copyRows(tp.trials, tp.count, tp.nFreqs, tp.nTimes, from, to));
    return Comlink.transfer({ trials: out, counts: held.conditions.map((tp) => tp.count), nTimes: held.conditions[0]?.nTimes ?? 0 }, out.map((t) => t.buffer));
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
