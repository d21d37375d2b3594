import type { AperiodicModel } from '../../analysis/aperiodic';
import type { BaselineMethod, BaselineScope, BaselineSpread } from '../../analysis/baseline';
import type { EventTableSpec } from '../../analysis/event-table';
import type { RecipeInput } from '../../analysis/recipe';
import { conditioningSpec, sourceSpec, type Condition, type ConditioningSettings, type LocalRecordingInfo, type RejectionSettings } from './source-rules';

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
  /** The fit range is the workspace's `fitRange` (dragged on the Spectrum screen), like the baseline. */
  aperiodic: { model: AperiodicModel };
  /** Phase consistency beside power (recipe `"itpc": true`). Optional: drafts saved before it lack it. */
  itpc?: boolean;
  /** Total power, or induced power with each condition's evoked response taken out first (recipe `trialPower`). */
  trialPower?: 'total' | 'induced';
  /** Named regions written into the recipe (`channelGroups`); null or absent: the defaults from the channel names. */
  channelGroups?: { name: string; channels: string[] }[] | null;
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
  itpc: false,
  trialPower: 'total',
  channelGroups: null,
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

/**
 * Everything a recipe is made of, as the workspace store holds it (store.ts): the Recipe screen's draft, the Source
 * screen's conditions, window, rejection, conditioning and event selection, the live baseline and fit range, and
 * what identifies and reads the open file.
 */
export interface RecipeParts {
  draft: RecipeDraft;
  conditions: Condition[];
  /** The epoch window, `epochs.start`/`end` in seconds from the event. */
  epochWindow: { start: number; end: number };
  rejection: RejectionSettings;
  /** Channel types changed by hand, bad channels, reference and filters (recipe `signals`, `reference`, `filters`). */
  conditioning?: ConditioningSettings;
  /** Rows of the paired events file chosen as events (recipe `eventTable`); null or absent: all rows. */
  eventSelection?: EventTableSpec | null;
  /** SHA-256 of the open file; written into the recipe only when it is one (64 hex digits). */
  fingerprint: string | null;
  /** How the file was read beyond the built-in units (LocalRecordingInfo.reading); written when not empty. */
  local?: Pick<LocalRecordingInfo, 'reading'> | null;
  baseline: { start: number; end: number };
  method: BaselineMethod;
  scope: BaselineScope;
  spread?: BaselineSpread;
  fitRange: readonly [number, number];
}

/**
 * The full recipe (analysis.md, "Recipe (input)", plus our `conditions`, `rejection` and `recording` extensions)
 * of the workspace: one argument, the one owner's state. Exported as is, so `npm run analyze -- <file> --recipe <it>`
 * reproduces the numbers.
 */
export function toRecipe(parts: RecipeParts): RecipeInput {
  const { draft, baseline, fitRange } = parts;
  const cycles =
    draft.cyclesMode === 'fixed'
      ? { fixed: draft.cyclesFixed }
      : draft.cyclesMode === 'fwhm'
        ? { fwhm: draft.fwhmSeconds }
        : { min: draft.cyclesMin, max: draft.cyclesMax };
  const conditionNames = parts.conditions.map((c) => c.name);
  const events = draft.conditions.length > 0 ? draft.conditions.filter((c) => conditionNames.includes(c)) : conditionNames;
  const spec = sourceSpec(parts);
  const { start, end } = parts.epochWindow;
  return {
    format: 2,
    epochs: { events, start, end },
    ...(draft.channels.length > 0 ? { channels: draft.channels } : {}),
    frequencies: { ...draft.frequencies },
    cycles,
    // `spread` is written only where it means something: an across-trials z-score.
    baseline: { start: baseline.start, end: baseline.end, method: parts.method, scope: parts.scope, ...(parts.method === 'z-score' && parts.spread === 'trials' ? { spread: 'trials' as const } : {}) },
    spectrum: { ...draft.spectrum, range: [...draft.spectrum.range] as [number, number] },
    aperiodic: { range: [fitRange[0], fitRange[1]], model: draft.aperiodic.model },
    ...(draft.itpc === true ? { itpc: true } : {}),
    conditions: spec.conditions as Record<string, string[]>,
    rejection: spec.rejection as NonNullable<RecipeInput['rejection']>,
    ...((parts.conditioning !== undefined ? conditioningSpec(parts.conditioning) : {}) as Pick<RecipeInput, 'signals' | 'reference' | 'filters'>),
    ...(parts.eventSelection ? { eventTable: eventTableOf(parts.eventSelection) } : {}),
    // Written only when asked for, so a recipe without them stays the contract's plain recipe.
    ...(draft.itpc === true ? { itpc: true } : {}),
    ...(draft.trialPower === 'induced' ? { trialPower: 'induced' as const } : {}),
    ...(draft.channelGroups ? { channelGroups: Object.fromEntries(draft.channelGroups.map((g) => [g.name, g.channels.slice()])) } : {}),
    ...recordingSection(parts),
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
function recordingSection(source: RecipeParts): Pick<RecipeInput, 'recording'> {
  const recording: NonNullable<RecipeInput['recording']> = {};
  if (source.fingerprint !== null && /^[0-9a-f]{64}$/.test(source.fingerprint)) recording.fingerprint = source.fingerprint;
  const units = source.local?.reading?.unitFactors ?? {};
  if (Object.keys(units).length > 0) recording.units = { ...units };
  const exclude = source.local?.reading?.exclude ?? [];
  if (exclude.length > 0) recording.exclude = exclude.slice();
  return Object.keys(recording).length > 0 ? { recording } : {};
}

/**
 * Cache key of a decomposition: the recipe without its baseline, aperiodic fit range and channel groups (the explorer
 * re-normalizes, re-fits and averages regions live).
 */
export function decompositionKey(recordingId: string, recipe: RecipeInput): string {
  const { baseline: _baseline, aperiodic, channelGroups: _groups, ...rest } = recipe;
  return `${recordingId}|${JSON.stringify({ ...rest, aperiodicModel: aperiodic.model })}`;
}
