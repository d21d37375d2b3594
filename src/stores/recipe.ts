import { create } from 'zustand';
import type { RecipeInput } from '../lib/analysis/recipe';

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
  aperiodic: { range: [number, number]; mode: 'fixed' | 'knee' };
}

export const DEFAULT_DRAFT: RecipeDraft = {
  frequencies: { min: 3, max: 40, count: 30, spacing: 'log' },
  cyclesMode: 'range',
  cyclesFixed: 5,
  cyclesMin: 3,
  cyclesMax: 8,
  fwhmSeconds: 0.3,
  channels: [],
  conditions: [],
  spectrum: { segment: 1, overlap: 0.5, range: [1, 45], source: 'recording' },
  aperiodic: { range: [2, 40], mode: 'fixed' },
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

/**
 * The contract recipe (analysis.md, "Recipe (input)") for the draft, the Source screen's conditions and epoch
 * window, and a baseline. Exported as is, so `npm run analyze -- <file> --recipe <it>` reproduces the numbers.
 */
export function toRecipe(
  draft: RecipeDraft,
  source: { conditionNames: string[]; tmin: number; tmax: number },
  baseline: { start: number; end: number; method: 'db' | 'percent' | 'zscore' | 'ratio'; scope: 'average' | 'trial' },
): RecipeInput {
  const cycles =
    draft.cyclesMode === 'fixed'
      ? { fixed: draft.cyclesFixed }
      : draft.cyclesMode === 'fwhm'
        ? { fwhm: draft.fwhmSeconds }
        : { min: draft.cyclesMin, max: draft.cyclesMax };
  const events = draft.conditions.length > 0 ? draft.conditions.filter((c) => source.conditionNames.includes(c)) : source.conditionNames;
  return {
    epochs: { events, tmin: source.tmin, tmax: source.tmax },
    ...(draft.channels.length > 0 ? { channels: draft.channels } : {}),
    frequencies: { ...draft.frequencies },
    cycles,
    baseline: { ...baseline },
    spectrum: { ...draft.spectrum, range: [...draft.spectrum.range] as [number, number] },
    aperiodic: { ...draft.aperiodic, range: [...draft.aperiodic.range] as [number, number] },
  };
}

/** Cache key of a decomposition: the recipe without its baseline (the explorer re-normalizes live). */
export function decompositionKey(recordingId: string, recipe: RecipeInput): string {
  const { baseline: _baseline, ...rest } = recipe;
  return `${recordingId}|${JSON.stringify(rest)}`;
}
