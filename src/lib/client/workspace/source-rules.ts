import type { Recording } from '../../analysis/recording';
import type { EdfReading, IntakeLocal } from '../../formats/intake';
import type { ChannelType } from '../../analysis/channel-types';
import { selectEventRows, type EventRow, type EventTableSpec } from '../../analysis/event-table';
import { conditionRecording, type ConditionSpec, type FiltersSpec, type ReferenceSpec } from '../../analysis/condition-recording';
import { prepareRecording, type EpochDecision, type PrepareSpec } from '../../analysis/prepare-recording';

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

export type { EpochDecision } from '../../analysis/prepare-recording';

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

/** The source settings a recipe is made of (the workspace store holds them; see store.ts). */
export interface SourceSettings {
  conditions: Condition[];
  epochWindow: { start: number; end: number };
  rejection: RejectionSettings;
  conditioning: ConditioningSettings;
}

/** The Source screen's settings as the recipe's `epochs`, `conditions` and `rejection` fields (recipe extensions). */
export function sourceSpec(state: Pick<SourceSettings, 'conditions' | 'epochWindow' | 'rejection'>): PrepareSpec {
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
  state: SourceSettings & { recording: Recording | null },
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

/**
 * The recording's events with the paired events file's rows chosen by `spec` (recipe `eventTable`): the file's own
 * annotations first, then the chosen rows. Throws (naming the field) when the spec does not fit the table.
 */
export function eventsWithSelection(recording: Recording, table: NonNullable<LocalRecordingInfo['eventTable']>, spec: EventTableSpec | null): Recording {
  return selectionOf(recording, table, spec).recording;
}

/** `eventsWithSelection` and the selection's own warning lines. */
export function selectionOf(recording: Recording, table: NonNullable<LocalRecordingInfo['eventTable']>, spec: EventTableSpec | null): { recording: Recording; warnings: string[] } {
  const chosen = selectEventRows(table.rows, table.header, spec ?? {}, recording.data[0].length / recording.sampleRateHz);
  return { recording: { ...recording, events: [...recording.events.slice(0, table.annotationCount), ...chosen.events] }, warnings: chosen.warnings };
}

/** The recording to analyse: events relabelled to condition names, rejected epochs left out. */
export function analysisRecordingOf(state: SourceSettings & { recording: Recording | null; settingsError: string | null }): Recording | null {
  if (!state.recording) return null;
  if (state.conditions.length === 0 || state.settingsError !== null) return { ...state.recording, events: [] };
  // Decided on the conditioned recording (as a run decides), returned with the file's own samples: a run
  // conditions them itself from the recipe.
  const conditioned = conditionRecording(state.recording, conditioningSpec(state.conditioning)).recording;
  return { ...state.recording, events: prepareRecording(conditioned, sourceSpec(state)).recording.events };
}
