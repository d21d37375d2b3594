import { create } from 'zustand';
import type { AperiodicModel } from '../lib/analysis/aperiodic';
import type { BaselineMethod } from '../lib/analysis/baseline';
import type { EventTableSpec } from '../lib/analysis/event-table';
import type { RecipeInput } from '../lib/analysis/recipe';
import { conditioningSpec, sourceSpec, type Condition, type ConditioningSettings, type RejectionSettings } from './source';

export type CyclesMode = 'fixed' | 'range' | 'fwhm';

/** The Recipe panel's editable fields, kept as entered; `toRecipe` turns them into the contract's recipe JSON. */
export interface RecipeDraft {
  frequencies: { min: number; max: number; count: number; spacing: 'log' | 'linear' };
  cyclesMode: CyclesMode;
  cyclesFixed: number;
  cyclesMin: number;
  cyclesMax: number;
  fwhmSeconds: number;
  /** Channels to decompose; empty means every data signal. */
  channels: string[];
  /** Condition names to epoch; empty means every condition of the Source screen. */
  conditions: string[];
  spectrum: { segment: number; overlap: number; range: [number, number]; source: 'recording' | 'epochs' };
  /** The fit range is live view state (`useViewStore().fitRange`, dragged on the Spectrum screen), like the baseline. */
  aperiodic: { model: AperiodicModel };
}

// 3–45 Hz covers the default bands (theta 4–8 … gamma 30–45 Hz). At 3 Hz the 3-cycle wavelet's edge zone is
// 3σ = 3·3/(2π·3) ≈ 0.477 s, so the default −0.5 … −0.2 s baseline in the default −1 … 2 s epoch stays clear of it.
export const DEFAULT_DRAFT: RecipeDraft = {
  frequencies: { min: 3, max: 45, count: 30, spacing: 'log' },
  cyclesMode: 'range',
  cyclesFixed: 5,
  cyclesMin: 3,
  cyclesMax: 8,
  fwhmSeconds: 0.3,
  channels: [],
  conditions: [],
  // The kept epochs by default: the whole recording would mix in breaks, rejected epochs and artefacts.
  spectrum: { segment: 1, overlap: 0.5, range: [1, 45], source: 'epochs' },
  aperiodic: { model: 'power-law' },
};

export interface RunChannelProgress {
  channel: string;
  fraction: number;
}

export interface RunState {
  status: 'idle' | 'running' | 'done' | 'cancelled' | 'failed';
  progress: RunChannelProgress[];
  message: string | null;
}

export interface RecipeState {
  draft: RecipeDraft;
  run: RunState;
  setDraft: (patch: Partial<RecipeDraft>) => void;
  setRun: (patch: Partial<RunState>) => void;
}

export const useRecipeStore = create<RecipeState>((set, get) => ({
  draft: DEFAULT_DRAFT,
  run: { status: 'idle', progress: [], message: null },
  setDraft: (patch) => set({ draft: { ...get().draft, ...patch } }),
  setRun: (patch) => set({ run: { ...get().run, ...patch } }),
}));

/** What the Source screen contributes to a recipe. */
export interface RecipeSource {
  conditions: Condition[];
  /** The epoch window, `epochs.start`/`end` in seconds from the event. */
  epochStart: number;
  epochEnd: number;
  rejection: RejectionSettings;
  /** Channel types changed by hand, bad channels, reference and filters (recipe `signals`, `reference`, `filters`). */
  conditioning?: ConditioningSettings;
  /** Rows of the paired events file chosen as events (recipe `eventTable`); null or absent: all rows. */
  eventSelection?: EventTableSpec | null;
  /** SHA-256 of the open file; written into the recipe only when it is one (64 hex digits). */
  fingerprint: string | null;
  /** How the file was read beyond the built-in units (LocalRecordingInfo.reading); written when not empty. */
  reading?: { unitFactors?: Record<string, number>; exclude?: string[] } | null;
}

/**
 * The full recipe (analysis.md, "Recipe (input)", plus our `conditions`, `rejection` and `recording` extensions)
 * for the draft, the Source screen's conditions, window and rejection, a baseline and the aperiodic fit range.
 * Exported as is, so `npm run analyze -- <file> --recipe <it>` reproduces the numbers.
 */
export function toRecipe(
  draft: RecipeDraft,
  source: RecipeSource,
  baseline: { start: number; end: number; method: BaselineMethod; scope: 'average' | 'trial'; spread?: 'time' | 'trials' },
  fitRange: readonly [number, number],
): RecipeInput {
  const cycles =
    draft.cyclesMode === 'fixed'
      ? { fixed: draft.cyclesFixed }
      : draft.cyclesMode === 'fwhm'
        ? { fwhm: draft.fwhmSeconds }
        : { min: draft.cyclesMin, max: draft.cyclesMax };
  const conditionNames = source.conditions.map((c) => c.name);
  const events = draft.conditions.length > 0 ? draft.conditions.filter((c) => conditionNames.includes(c)) : conditionNames;
  const spec = sourceSpec({ conditions: source.conditions, epochWindow: { start: source.epochStart, end: source.epochEnd }, rejection: source.rejection });
  return {
    format: 2,
    epochs: { events, start: source.epochStart, end: source.epochEnd },
    ...(draft.channels.length > 0 ? { channels: draft.channels } : {}),
    frequencies: { ...draft.frequencies },
    cycles,
    // `spread` is written only where it means something: an across-trials z-score.
    baseline: { start: baseline.start, end: baseline.end, method: baseline.method, scope: baseline.scope, ...(baseline.method === 'z-score' && baseline.spread === 'trials' ? { spread: 'trials' as const } : {}) },
    spectrum: { ...draft.spectrum, range: [...draft.spectrum.range] as [number, number] },
    aperiodic: { range: [fitRange[0], fitRange[1]], model: draft.aperiodic.model },
    conditions: spec.conditions as Record<string, string[]>,
    rejection: spec.rejection as NonNullable<RecipeInput['rejection']>,
    ...((source.conditioning !== undefined ? conditioningSpec(source.conditioning) : {}) as Pick<RecipeInput, 'signals' | 'reference' | 'filters'>),
    ...(source.eventSelection ? { eventTable: eventTableOf(source.eventSelection) } : {}),
    ...recordingSection(source),
  };
}

/** The recipe's `eventTable`: only the parts that were set. */
function eventTableOf(spec: EventTableSpec): NonNullable<RecipeInput['eventTable']> {
  return {
    ...(spec.labelColumn !== undefined ? { labelColumn: spec.labelColumn } : {}),
    ...(spec.where !== undefined && spec.where.length > 0 ? { where: spec.where.slice() } : {}),
    ...(spec.shiftBy !== undefined ? { shiftBy: spec.shiftBy } : {}),
  };
}

/** The recipe's `recording` extension: the file's fingerprint and how it was read (`units`, `exclude`), when known. */
function recordingSection(source: RecipeSource): Pick<RecipeInput, 'recording'> {
  const recording: NonNullable<RecipeInput['recording']> = {};
  if (source.fingerprint !== null && /^[0-9a-f]{64}$/.test(source.fingerprint)) recording.fingerprint = source.fingerprint;
  const units = source.reading?.unitFactors ?? {};
  if (Object.keys(units).length > 0) recording.units = { ...units };
  const exclude = source.reading?.exclude ?? [];
  if (exclude.length > 0) recording.exclude = exclude.slice();
  return Object.keys(recording).length > 0 ? { recording } : {};
}

/**
 * Cache key of a decomposition: the recipe without its baseline and aperiodic fit range (the explorer re-normalizes
 * and re-fits live).
 */
export function decompositionKey(recordingId: string, recipe: RecipeInput): string {
  const { baseline: _baseline, aperiodic, ...rest } = recipe;
  return `${recordingId}|${JSON.stringify({ ...rest, aperiodicModel: aperiodic.model })}`;
}
