import { create } from 'zustand';
import type { Recording } from '../lib/analysis/recording';
import type { EdfReading, IntakeLocal } from '../lib/formats/intake';
import { eventKey } from '../lib/analysis/event-key';
import type { ChannelType } from '../lib/analysis/channel-types';
import { selectEventRows, type EventRow, type EventTableSpec } from '../lib/analysis/event-table';
import { conditionRecording, type ConditionSpec, type FiltersSpec, type ReferenceSpec } from '../lib/analysis/condition-recording';
import { prepareRecording, type EpochDecision, type PrepareSpec } from '../lib/analysis/prepare-recording';

/**
 * The Source screen's state: the recording opened on this device and how its events become conditions and epochs.
 * Everything here stays in the browser. `local` holds what identifies the recording (file name, header patient and
 * recording fields) and must never be put into a request; the server learns only `fingerprint` and `subjectCode`.
 *
 * Contract between the Source screen (which fills this store) and the Recipe/Maps/Spectrum/Bands screens (which read
 * it): read `recording`, `conditions`, `epochWindow`, `rejection`, and call `analysisRecording()` for the recording
 * to analyse — its events are relabelled with condition names and hold only the kept epochs.
 */
export interface LocalRecordingInfo extends Omit<IntakeLocal, 'excludedSignals' | 'mappedSignals' | 'eventTable'> {
  fileName: string;
  /** EDF signals the person chose to leave out, and analysed signals read through a unit factor they gave. */
  excludedSignals?: IntakeLocal['excludedSignals'];
  mappedSignals?: IntakeLocal['mappedSignals'];
  /** The reading choices the file was opened with; they go into the recipe's `recording.units` / `exclude`. */
  reading?: EdfReading;
  /** A paired BIDS events file's rows; its events follow the first `annotationCount` events of the recording. */
  eventTable?: { header: string[]; rows: EventRow[]; annotationCount: number };
  /**
   * The eventTable selection's lines (`selectEventRows`), shown after `warnings`: together the same lines the
   * command line prints for this file, events file and recipe, before the run's own.
   */
  selectionWarnings?: string[];
}

/**
 * What opening the file said, in the command line's order: the intake's lines (`recordingWarnings`, one function
 * for both), then the eventTable selection's. A Result carries these before the run's own, as on the command line.
 */
export function openedWarnings(local: LocalRecordingInfo | null): string[] {
  return local === null ? [] : [...local.warnings, ...(local.selectionWarnings ?? [])];
}

export interface Condition {
  name: string;
  labels: string[];
}

export interface RejectionSettings {
  /** Peak-to-peak threshold in µV; null disables the rule. 150 µV by default (a common rule of thumb). */
  peakToPeakMicrovolts: number | null;
  /** Standard deviation below which a channel counts as flat, in µV; null disables the rule. */
  flatMicrovolts: number | null;
  /** 'any': an epoch is rejected when any analysed channel breaks a rule; 'channel': only `channels` are checked. */
  scope: 'any' | 'channel';
  /** Channel names the rules check when scope is 'channel'. */
  channels?: string[];
  /** Limits per channel type, in that type's unit (the recipe's `rejection.byType`). */
  byType?: Partial<Record<ChannelType, { peakToPeak: number | null; flat: number | null }>>;
  /** Manual decisions by event key (`eventKey`: index, onset and label of the event), overriding the rules. */
  overrides: Record<string, 'keep' | 'reject'>;
}

export type { EpochDecision } from '../lib/analysis/prepare-recording';

/**
 * How the continuous recording is conditioned before epoching (recipe `signals`, `reference`, `filters`): types
 * changed by hand (only the changes; the rest is inferred from the file) and channels marked bad.
 */
export interface ConditioningSettings {
  types: Record<string, ChannelType>;
  bad: string[];
  /** The recipe's `reference`; as recorded when null. */
  reference: ReferenceSpec | null;
  /** The recipe's `filters`; none when null. */
  filters: FiltersSpec | null;
}

export const defaultConditioning: ConditioningSettings = { types: {}, bad: [], reference: null, filters: null };

/** The conditioning settings as the recipe's fields, without empty ones. */
export function conditioningSpec(c: ConditioningSettings): ConditionSpec {
  const signals = {
    ...(Object.keys(c.types).length > 0 ? { types: { ...c.types } } : {}),
    ...(c.bad.length > 0 ? { bad: c.bad.slice() } : {}),
  };
  return {
    ...(Object.keys(signals).length > 0 ? { signals } : {}),
    ...(c.reference !== null && c.reference.kind !== 'as-recorded' ? { reference: c.reference } : {}),
    ...(c.filters !== null && (c.filters.highPass !== undefined || c.filters.notch !== undefined) ? { filters: c.filters } : {}),
  };
}

export interface SourceState {
  recording: Recording | null;
  local: LocalRecordingInfo | null;
  /** SHA-256 of the file's bytes, lowercase hex. */
  fingerprint: string | null;
  subjectCode: string;
  conditions: Condition[];
  epochWindow: { start: number; end: number };
  rejection: RejectionSettings;
  conditioning: ConditioningSettings;
  /** Which rows of the paired events file are events, and onset shifts (recipe `eventTable`); null: all rows. */
  eventSelection: EventTableSpec | null;
  /** One entry per event that belongs to a condition, recomputed when settings change. */
  decisions: EpochDecision[];
  /** The recording to analyse: events relabelled to condition names, rejected epochs left out. */
  analysisRecording: () => Recording | null;
  set: (patch: Partial<Omit<SourceState, 'set' | 'analysisRecording' | Actions>>) => void;
  /** Why the conditions, window or rejection settings cannot be applied (decisions are then empty); null when fine. */
  settingsError: string | null;
  /** Puts a freshly opened recording in place, keeping conditions whose labels it also has. */
  load: (opened: { recording: Recording; local: LocalRecordingInfo; fingerprint: string }) => void;
  setConditions: (conditions: Condition[]) => void;
  setEpochWindow: (epochWindow: { start: number; end: number }) => void;
  setRejection: (patch: Partial<Omit<RejectionSettings, 'overrides'>>) => void;
  setConditioning: (patch: Partial<ConditioningSettings>) => void;
  /** Re-derives the events from the events file; returns the problem (naming the field) and changes nothing on one. */
  setEventSelection: (spec: EventTableSpec | null) => string | null;
  /** A manual decision for one epoch; null returns it to the rules. */
  setOverride: (eventIndex: number, decision: 'keep' | 'reject' | null) => void;
  /** Recomputes `decisions` from the recording, conditions, window and rejection settings. */
  recompute: () => void;
}

type Actions = 'load' | 'setConditions' | 'setEpochWindow' | 'setRejection' | 'setConditioning' | 'setEventSelection' | 'setOverride' | 'recompute';

/** The Source screen's settings as the recipe's `epochs`, `conditions` and `rejection` fields (recipe extensions). */
export function sourceSpec(state: Pick<SourceState, 'conditions' | 'epochWindow' | 'rejection'>): PrepareSpec {
  const { conditions, epochWindow, rejection } = state;
  return {
    epochs: { start: epochWindow.start, end: epochWindow.end },
    conditions: Object.fromEntries(conditions.map((c) => [c.name, c.labels.slice()])),
    rejection: {
      peakToPeakMicrovolts: rejection.peakToPeakMicrovolts,
      flatMicrovolts: rejection.flatMicrovolts,
      scope: rejection.scope,
      ...(rejection.scope === 'channel' ? { channels: (rejection.channels ?? []).slice() } : {}),
      ...(rejection.byType !== undefined && Object.keys(rejection.byType).length > 0 ? { byType: { ...rejection.byType } } : {}),
      overrides: { ...rejection.overrides },
    },
  };
}

/** The decisions for the current state, or the reason there are none. Pure: the store calls it on every change. */
export function decideEpochs(
  state: Pick<SourceState, 'recording' | 'conditions' | 'epochWindow' | 'rejection' | 'conditioning'>,
): { decisions: EpochDecision[]; settingsError: string | null } {
  const { recording, conditions } = state;
  if (!recording || conditions.length === 0) return { decisions: [], settingsError: null };
  try {
    // Rejection looks at the recording as the run will see it: types, bad channels, reference, filters.
    const conditioned = conditionRecording(recording, conditioningSpec(state.conditioning)).recording;
    return { decisions: prepareRecording(conditioned, sourceSpec(state)).decisions, settingsError: null };
  } catch (error) {
    return { decisions: [], settingsError: error instanceof Error ? error.message : String(error) };
  }
}

/** Condition names may hold letters, digits, space and . _ / : - (conditions.ts); labels may hold more. */
function conditionNameOf(label: string): string {
  return label.replace(/[^\p{L}\p{N} ._/:-]+/gu, '-').replace(/^[^\p{L}\p{N}]+/u, '').slice(0, 40).trim();
}

/** A first-time default: one condition per distinct event label when there are a handful (≤ 8) of them. */
export function conditionsPerLabel(events: readonly { label: string }[], most = 8): Condition[] {
  const labels = [...new Set(events.map((e) => e.label))];
  if (labels.length === 0 || labels.length > most) return [];
  const out: Condition[] = [];
  const taken = new Set<string>();
  for (const label of labels) {
    const base = conditionNameOf(label);
    if (base === '') continue;
    let name = base;
    for (let k = 2; taken.has(name.toLowerCase()); k++) name = `${base.slice(0, 36)} ${k}`;
    taken.add(name.toLowerCase());
    out.push({ name, labels: [label] });
  }
  return out;
}

export const defaultRejection: RejectionSettings = { peakToPeakMicrovolts: 150, flatMicrovolts: 0.5, scope: 'any', overrides: {} };

export const useSourceStore = create<SourceState>((set, get) => ({
  recording: null,
  local: null,
  fingerprint: null,
  subjectCode: '',
  conditions: [],
  // 3 s around the event: room for a −0.5 … −0.2 s baseline clear of the edge zone down to 3 Hz (recipe defaults).
  epochWindow: { start: -1, end: 2 },
  rejection: defaultRejection,
  conditioning: defaultConditioning,
  eventSelection: null,
  decisions: [],
  settingsError: null,
  analysisRecording: () => {
    const state = get();
    if (!state.recording) return null;
    if (state.conditions.length === 0 || state.settingsError !== null) return { ...state.recording, events: [] };
    // Decided on the conditioned recording (as a run decides), returned with the file's own samples: a run
    // conditions them itself from the recipe.
    const conditioned = conditionRecording(state.recording, conditioningSpec(state.conditioning)).recording;
    return { ...state.recording, events: prepareRecording(conditioned, sourceSpec(state)).recording.events };
  },
  set: (patch) => set(patch),
  load: ({ recording: opened, local, fingerprint }) => {
    // The core compares a recipe's recording.fingerprint with this, in the browser as on the command line.
    const recording = { ...opened, fingerprint };
    const labels = new Set(recording.events.map((e) => e.label));
    const kept = get()
      .conditions.map((c) => ({ ...c, labels: c.labels.filter((l) => labels.has(l)) }))
      .filter((c) => c.labels.length > 0);
    const conditions = kept.length > 0 ? kept : conditionsPerLabel(recording.events);
    const rejection = { ...get().rejection, overrides: {}, channels: (get().rejection.channels ?? []).filter((n) => recording.channelNames.includes(n)) };
    // Type changes and bad marks belong to one file's channels: keep those whose channel the new file also has.
    const has = (n: string) => recording.channelNames.includes(n);
    const previous = get().conditioning;
    const conditioning = { ...previous, types: Object.fromEntries(Object.entries(previous.types).filter(([n]) => has(n))), bad: previous.bad.filter(has) };
    set({ recording, local, fingerprint, conditions, rejection, conditioning, eventSelection: null, ...decideEpochs({ ...get(), recording, conditions, rejection, conditioning }) });
  },
  setConditions: (conditions) => set({ conditions, ...decideEpochs({ ...get(), conditions }) }),
  setEpochWindow: (epochWindow) => set({ epochWindow, ...decideEpochs({ ...get(), epochWindow }) }),
  setRejection: (patch) => {
    const rejection = { ...get().rejection, ...patch };
    set({ rejection, ...decideEpochs({ ...get(), rejection }) });
  },
  setEventSelection: (spec) => {
    const { recording, local } = get();
    if (recording === null || local?.eventTable === undefined) return spec === null ? null : 'eventTable needs a BIDS events file opened with the recording';
    const table = local.eventTable;
    let chosen;
    try {
      chosen = selectEventRows(table.rows, table.header, spec ?? {}, recording.data[0].length / recording.sampleRateHz);
    } catch (error) {
      return error instanceof Error ? error.message : String(error);
    }
    const events = [...recording.events.slice(0, table.annotationCount), ...chosen.events];
    const next = { ...recording, events };
    // Conditions keep the labels that still occur; with none left, one condition per label as on opening.
    const labels = new Set(events.map((e) => e.label));
    const kept = get()
      .conditions.map((c) => ({ ...c, labels: c.labels.filter((l) => labels.has(l)) }))
      .filter((c) => c.labels.length > 0);
    const claimed = new Set(kept.flatMap((c) => c.labels));
    const added = conditionsPerLabel(events.filter((e) => !claimed.has(e.label))).filter((c) => !kept.some((k) => k.name === c.name));
    const conditions = [...kept, ...added];
    // Event keys count positions in the event list, which a new selection changes: manual decisions start afresh.
    const rejection = { ...get().rejection, overrides: {} };
    set({ recording: next, local: { ...local, selectionWarnings: chosen.warnings }, eventSelection: spec, conditions, rejection, ...decideEpochs({ ...get(), recording: next, conditions, rejection }) });
    return null;
  },
  setConditioning: (patch) => {
    const conditioning = { ...get().conditioning, ...patch };
    set({ conditioning, ...decideEpochs({ ...get(), conditioning }) });
  },
  setOverride: (eventIndex, decision) => {
    const recording = get().recording;
    if (!recording || recording.events[eventIndex] === undefined) return;
    const key = eventKey(eventIndex, recording.events[eventIndex]);
    const overrides = { ...get().rejection.overrides };
    if (decision === null) delete overrides[key];
    else overrides[key] = decision;
    const rejection = { ...get().rejection, overrides };
    set({ rejection, ...decideEpochs({ ...get(), rejection }) });
  },
  recompute: () => set(decideEpochs(get())),
}));
