import type { AperiodicModel, AperiodicOutcome } from '../../analysis/aperiodic';
import type { EpochSpectra } from '../../analysis/epoch-spectra';
import { explorerWorker } from '../explorer-worker';
import { BudgetCache } from './cache-budget';
import type { Decomposition, RecipeSpectrum } from './results';

export type { RecipeSpectrum };

/**
 * What the Spectrum screen shows of a decomposition. The spectra are the run's own (its workers made them from the
 * conditioned samples they held, `analyzeChannel`): nothing is computed again over the recording. Only the refit
 * for a dragged fit range is new work, in the explorer worker.
 */
export interface SpectrumWork {
  /** Per channel, one Welch spectrum per kept epoch; null when the run did not keep them. */
  epochSpectra(d: Decomposition): EpochSpectra[] | null;
  /** Per channel, the recipe's Welch spectrum over every bin (what the run fitted). */
  recipeSpectra(d: Decomposition): RecipeSpectrum[];
  /** Every channel's aperiodic fit over `rangeHz` (the live fit range), refitted off the main thread. */
  fits(d: Decomposition, spectra: RecipeSpectrum[], rangeHz: readonly [number, number], model: AperiodicModel): Promise<AperiodicOutcome[]>;
}

/** The explorer worker's refit (tests count its calls). */
export interface FitWorker {
  fitEach(spectra: RecipeSpectrum[], rangeHz: [number, number], model: AperiodicModel): Promise<AperiodicOutcome[]>;
}

let fitWorker: () => FitWorker = explorerWorker;

/** Replaces the worker that refits (tests); `null` restores the explorer's worker. */
export function configureSpectra(worker: (() => FitWorker) | null): void {
  fitWorker = worker ?? explorerWorker;
  fitCache.clear();
}

// Fits are derived and re-computable: small, but one per fit range dragged, so under a budget (least recently
// used out first).
const fitCache = new BudgetCache<AperiodicOutcome[]>(8 * 1024 * 1024);
const inFlight = new Map<string, Promise<AperiodicOutcome[]>>();

/** The cached fits, the same refit already under way, or a new refit whose answer is kept. */
function remember(key: string, make: () => Promise<AperiodicOutcome[]>): Promise<AperiodicOutcome[]> {
  const hit = fitCache.get(key);
  if (hit !== undefined) return Promise.resolve(hit);
  const running = inFlight.get(key);
  if (running !== undefined) return running;
  const p = make()
    .then((value) => {
      fitCache.set(key, value);
      return value;
    })
    .finally(() => inFlight.delete(key));
  inFlight.set(key, p);
  return p;
}

/**
 * Decompositions renamed (a large file's fingerprint arrived after its runs, results.ts `adoptFingerprint`): their
 * fits are kept under the new keys, so the Spectrum screen does not refit them.
 */
export function renameFits(renamed: ReadonlyMap<string, string>): void {
  if (renamed.size === 0) return;
  fitCache.rekey((key) => {
    // A fit's key is `${decomposition key}|low|high|model` (below); the decomposition key has bars of its own.
    const parts = key.split('|');
    const own = parts.slice(0, -3).join('|');
    const next = renamed.get(own);
    return next === undefined ? null : [next, ...parts.slice(-3)].join('|');
  });
}

/** A refit request overtaken by a newer fit range before it started. */
export class FitOvertaken extends Error {
  constructor() {
    super('overtaken by a newer fit range');
    this.name = 'FitOvertaken';
  }
}

interface Waiting {
  key: string;
  run: () => Promise<AperiodicOutcome[]>;
  resolve: (v: AperiodicOutcome[]) => void;
  reject: (e: unknown) => void;
}
let waiting: Waiting | null = null;
let fitting = false;

async function pump(): Promise<void> {
  fitting = true;
  try {
    while (waiting !== null) {
      const job = waiting;
      waiting = null;
      await job.run().then(job.resolve, job.reject);
    }
  } finally {
    fitting = false;
  }
}

export const spectrumWork: SpectrumWork = {
  epochSpectra: (d) => d.epochSpectra,
  recipeSpectra: (d) => d.recipeSpectra,
  fits(d, spectra, rangeHz, model) {
    const key = `${d.key}|${rangeHz[0]}|${rangeHz[1]}|${model}`;
    const hit = fitCache.get(key);
    if (hit !== undefined) return Promise.resolve(hit);
    // Latest wins: while one refit runs, only the newest request waits; the ones it overtakes are refused.
    return new Promise((resolve, reject) => {
      waiting?.reject(new FitOvertaken());
      waiting = { key, run: () => remember(key, () => fitWorker().fitEach(spectra, [rangeHz[0], rangeHz[1]], model)), resolve, reject };
      if (!fitting) void pump();
    });
  },
};
