import * as Comlink from 'comlink';
import type { AperiodicModel, AperiodicOutcome } from '../../analysis/aperiodic';
import type { EpochSpectra } from '../../analysis/epoch-spectra';
import type { Recording } from '../../analysis/recording';
import { explorerWorker } from '../explorer-worker';
import { BudgetCache } from './cache-budget';
import { conditionedSamples, type Decomposition } from './results';

export interface RecipeSpectrum {
  frequencies: Float64Array;
  psd: Float64Array;
}

/** What the Spectrum screen shows of a decomposition, all computed in the explorer worker. */
export interface SpectrumWork {
  epochSpectra(d: Decomposition, recording: Recording): Promise<EpochSpectra[]>;
  recipeSpectra(d: Decomposition, recording: Recording): Promise<RecipeSpectrum[]>;
  /** Every channel's aperiodic fit over `rangeHz` (the live fit range), refitted off the main thread. */
  fits(d: Decomposition, spectra: RecipeSpectrum[], rangeHz: readonly [number, number], model: AperiodicModel): Promise<AperiodicOutcome[]>;
}

// Derived, re-computable values under a budget each (least recently used out first): per-epoch spectra are the
// big ones (channels × trials × bins), fits are small but one per fit range dragged.
const epochCache = new BudgetCache<EpochSpectra[]>(96 * 1024 * 1024);
const recipeCache = new BudgetCache<RecipeSpectrum[]>(32 * 1024 * 1024);
const fitCache = new BudgetCache<AperiodicOutcome[]>(8 * 1024 * 1024);
const inFlight = new Map<string, Promise<unknown>>();

/** Copies of the decomposition's channels as the run saw them (the controller's conditioned arrays, from its plan). */
async function channelCopies(d: Decomposition, recording: Recording): Promise<Float32Array[]> {
  return (await conditionedSamples(d, recording)).map((x) => x.slice());
}

/** The cached value, the same work already under way, or new work whose answer is kept. */
function remember<T>(name: string, cache: BudgetCache<T>, key: string, make: () => Promise<T>): Promise<T> {
  const hit = cache.get(key);
  if (hit !== undefined) return Promise.resolve(hit);
  const id = `${name}|${key}`;
  const running = inFlight.get(id) as Promise<T> | undefined;
  if (running !== undefined) return running;
  const p = make()
    .then((value) => {
      cache.set(key, value);
      return value;
    })
    .finally(() => inFlight.delete(id));
  inFlight.set(id, p);
  return p;
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
  epochSpectra(d, recording) {
    return remember('epochs', epochCache, d.key, async () => {
      const samples = await channelCopies(d, recording);
      const starts = new Int32Array(d.epochStarts.reduce((n, s) => n + s.length, 0));
      let o = 0;
      for (const s of d.epochStarts) {
        starts.set(s, o);
        o += s.length;
      }
      const range = d.recipe.spectrum.range as [number, number];
      return explorerWorker().spectra(Comlink.transfer(samples, samples.map((x) => x.buffer)), d.sampleRateHz, starts, d.epochSamples, d.spectrumSegmentSamples, d.spectrumOverlapSamples, range);
    });
  },
  recipeSpectra(d, recording) {
    return remember('recipe', recipeCache, d.key, async () => {
      const samples = await channelCopies(d, recording);
      return explorerWorker().recipeSpectra(Comlink.transfer(samples, samples.map((x) => x.buffer)), d.sampleRateHz, d.spectrumSegmentSamples, d.spectrumOverlapSamples, d.spectrumSpans.slice());
    });
  },
  fits(d, spectra, rangeHz, model) {
    const key = `${d.key}|${rangeHz[0]}|${rangeHz[1]}|${model}`;
    const hit = fitCache.get(key);
    if (hit !== undefined) return Promise.resolve(hit);
    // Latest wins: while one refit runs, only the newest request waits; the ones it overtakes are refused.
    return new Promise((resolve, reject) => {
      waiting?.reject(new FitOvertaken());
      waiting = { key, run: () => remember('fits', fitCache, key, () => explorerWorker().fitEach(spectra, [rangeHz[0], rangeHz[1]], model)), resolve, reject };
      if (!fitting) void pump();
    });
  },
};
