import { readRecipe, type Recipe } from '../../analysis/recipe';
import type { Recording } from '../../analysis/recording';
import { planRecipe } from '../../analysis/run-recipe';
import type { RecipeDraft } from './recipe';
import { decideEpochs, defaultRejection, eventsWithSelection, type Condition, type ConditioningSettings, type RejectionSettings } from './source-rules';
import { useWorkspace } from './store';

export type ApplyOutcome = { ok: true; notices: string[] } | { ok: false; field: string; message: string };

function draftOf(recipe: Recipe, conditionNames: string[], current: RecipeDraft): RecipeDraft {
  const c = recipe.cycles;
  const cycles: Partial<RecipeDraft> =
    'fixed' in c ? { cyclesMode: 'fixed', cyclesFixed: c.fixed } : 'fwhm' in c ? { cyclesMode: 'fwhm', fwhmSeconds: c.fwhm } : { cyclesMode: 'range', cyclesMin: c.min, cyclesMax: c.max };
  const all = recipe.epochs.events.length === conditionNames.length && conditionNames.every((n) => recipe.epochs.events.includes(n));
  return {
    ...current,
    ...cycles,
    frequencies: { ...recipe.frequencies },
    channels: recipe.channels?.slice() ?? [],
    conditions: all ? [] : recipe.epochs.events.slice(),
    spectrum: { ...recipe.spectrum, range: [recipe.spectrum.range[0], recipe.spectrum.range[1]] },
    aperiodic: { model: recipe.aperiodic.model },
    itpc: recipe.itpc === true,
    trialPower: recipe.trialPower ?? 'total',
    channelGroups: recipe.channelGroups === undefined ? null : Object.entries(recipe.channelGroups).map(([name, channels]) => ({ name, channels: channels.slice() })),
  };
}

/** The reading choices in words, for comparing a recipe's with the open recording's: `"%" × 2.5 µV; "Resp" left out`. */
export function describeReading(reading: { unitFactors?: Record<string, number>; exclude?: readonly string[] } | null | undefined): string {
  const units = Object.entries(reading?.unitFactors ?? {})
    .sort(([a], [b]) => a.localeCompare(b))
    .map(([dimension, factor]) => `${JSON.stringify(dimension)} × ${factor} µV`);
  const out = [...(reading?.exclude ?? [])].sort().map((label) => `${JSON.stringify(label)} left out`);
  return [...units, ...out].join('; ') || 'the built-in units only';
}

/**
 * Puts a loaded recipe JSON into the workspace store in one change (one undo step), after checking it with the
 * recipe schema and against the open recording (`planRecipe`, the same check a run makes). On any problem nothing
 * changes and the outcome names the field.
 */
export function applyRecipe(
  input: unknown,
  recording: Recording,
  fingerprint: string | null,
  reading: { unitFactors?: Record<string, number>; exclude?: readonly string[] } | null = null,
): ApplyOutcome {
  let recipe: Recipe;
  let upgraded: string | null;
  let selected: Recording = recording;
  const table = useWorkspace.getState().local?.eventTable;
  try {
    ({ recipe, notice: upgraded } = readRecipe(input));
    // The recipe's eventTable picks the events of the paired events file first; the recipe is checked on those.
    if (recipe.eventTable !== undefined || table !== undefined) {
      if (table === undefined) return { ok: false, field: 'eventTable', message: 'eventTable selects rows of a BIDS events file: open the recording with its events file first; nothing was changed' };
      selected = eventsWithSelection(recording, table, recipe.eventTable ?? null);
    }
    planRecipe(selected, recipe);
  } catch (error) {
    const e = error as { field?: string; message?: string };
    return { ok: false, field: e.field ?? 'recipe', message: e.message ?? String(error) };
  }
  // Without `conditions`, each listed label is its own condition (the contract's reading of epochs.events).
  const conditions: Condition[] =
    recipe.conditions !== undefined
      ? Object.entries(recipe.conditions).map(([name, labels]) => ({ name, labels: labels.slice() }))
      : recipe.epochs.events.map((label) => ({ name: label, labels: [label] }));
  for (const entry of recipe.epochs.events) if (!conditions.some((c) => c.name === entry)) conditions.push({ name: entry, labels: [entry] });
  const r = recipe.rejection;
  // A recipe without rejection analyses every fitting epoch: the rules are off.
  const rejection: RejectionSettings =
    r === undefined
      ? { ...defaultRejection, peakToPeakMicrovolts: null, flatMicrovolts: null, overrides: {} }
      : { peakToPeakMicrovolts: r.peakToPeakMicrovolts, flatMicrovolts: r.flatMicrovolts, scope: r.scope, channels: r.channels?.slice(), overrides: { ...r.overrides }, ...(r.byType ? { byType: { ...r.byType } } : {}) };
  const conditioning: ConditioningSettings = { types: { ...(recipe.signals?.types ?? {}) }, bad: (recipe.signals?.bad ?? []).slice(), reference: recipe.reference ?? null, filters: recipe.filters ?? null };
  const state = useWorkspace.getState();
  const epochWindow = { start: recipe.epochs.start, end: recipe.epochs.end };
  const eventSelection = table !== undefined ? (recipe.eventTable ?? null) : state.eventSelection;
  const settings = { recording: table !== undefined ? selected : state.recording, conditions, epochWindow, rejection, conditioning };
  if (typeof performance !== 'undefined') performance.mark('tidemark:baseline-input');
  // One change of the one store: the history sees one step, the screens one repaint.
  useWorkspace.setState({
    ...settings,
    eventSelection,
    ...decideEpochs(settings),
    draft: draftOf(recipe, conditions.map((c) => c.name), state.draft),
    method: recipe.baseline.method,
    scope: recipe.baseline.scope,
    spread: recipe.baseline.spread ?? 'time',
    fitRange: [recipe.aperiodic.range[0], recipe.aperiodic.range[1]],
    baseline: { start: recipe.baseline.start, end: recipe.baseline.end },
  });
  const notices: string[] = [];
  // Format 1 is upgraded in place; say so (analysis contract: never silently). The next export writes format 2.
  if (upgraded !== null) notices.push('This recipe is in format 1 (written before format 2): it was read with its old names upgraded (epochs.tmin/tmax → start/end, method "db" → "decibel" and so on); Export recipe JSON writes it in format 2.');
  if (recipe.recording?.fingerprint !== undefined && fingerprint !== null && recipe.recording.fingerprint !== fingerprint) {
    notices.push(`This recipe was made on another recording (SHA-256 ${recipe.recording.fingerprint.slice(0, 12)}…); the open one is ${fingerprint.slice(0, 12)}….`);
  }
  // How the file is read is chosen when it is opened (Source screen), not by loading a recipe: say when they differ.
  const wanted = describeReading({ unitFactors: recipe.recording?.units, exclude: recipe.recording?.exclude });
  const open = describeReading(reading);
  if (wanted !== open) {
    notices.push(`This recipe reads the file with ${wanted}; the open recording was read with ${open}. Open the file again with the recipe's choices to get its numbers.`);
  }
  return { ok: true, notices };
}

/**
 * The Recipe screen's "Load recipe JSON": parses file `fileName`'s text and applies it to the open recording
 * (`applyRecipe`); the line to show says what was loaded, or what is wrong and that nothing was changed.
 */
export function loadRecipeText(fileName: string, text: string): { ok: boolean; text: string } {
  const { recording, fingerprint, local } = useWorkspace.getState();
  if (recording === null) return { ok: false, text: `${fileName}: open a recording first; nothing was changed.` };
  let json: unknown;
  try {
    json = JSON.parse(text);
  } catch (error) {
    return { ok: false, text: `${fileName} is not valid JSON (${error instanceof Error ? error.message : String(error)}); nothing was changed.` };
  }
  const outcome = applyRecipe(json, recording, fingerprint, local?.reading ?? null);
  return outcome.ok ? { ok: true, text: [`Loaded ${fileName}.`, ...outcome.notices].join(' ') } : { ok: false, text: `${fileName}: ${outcome.message}; nothing was changed.` };
}
