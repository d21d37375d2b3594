import { create } from 'zustand';
import type { Recording } from '../../analysis/recording';
import { eventKey } from '../../analysis/event-key';
import type { EventTableSpec } from '../../analysis/event-table';
import type { RecipeInput } from '../../analysis/recipe';
import { DEFAULT_DRAFT, toRecipe, type RecipeDraft, type RunState } from './recipe';
import {
  analysisRecordingOf,
  conditionsPerLabel,
  decideEpochs,
  defaultConditioning,
  defaultRejection,
  selectionOf,
  type Condition,
  type ConditioningSettings,
  type EpochDecision,
  type LocalRecordingInfo,
  type RejectionSettings,
} from './source-rules';
import { DEFAULT_VIEW, type ViewSettings } from './view';

/**
 * The workspace's one store: the open recording, the whole recipe (the Recipe screen's draft, the Source screen's
 * conditions, window, rejection, conditioning and event selection, the live baseline and fit range) and the view.
 * Screens read it through selectors; the controller (controller.ts) keeps its history and saves it.
 *
 * Everything here stays in the browser. `local` holds what identifies the recording (file name, header patient and
 * recording fields) and must never be put into a request; the server learns only `fingerprint` and `subjectCode`.
 */
export interface WorkspaceData extends ViewSettings {
  recording: Recording | null;
  local: LocalRecordingInfo | null;
  /**
   * SHA-256 of the file's bytes, lowercase hex (or the demo's own id). A large file is shown before it is known:
   * null then, with `fingerprintWait` saying how far the hashing is. Everything keyed by it waits for it.
   */
  fingerprint: string | null;
  /** The open recording's fingerprint while it is being computed (`fraction` 0 … 1) or when it failed; else null. */
  fingerprintWait: { state: 'computing'; fraction: number } | { state: 'failed'; message: string } | null;
  subjectCode: string;
  conditions: Condition[];
  epochWindow: { start: number; end: number };
  rejection: RejectionSettings;
  conditioning: ConditioningSettings;
  /** Which rows of the paired events file are events, and onset shifts (recipe `eventTable`); null: all rows. */
  eventSelection: EventTableSpec | null;
  /** One entry per event that belongs to a condition, recomputed when settings change. */
  decisions: EpochDecision[];
  /** Why the conditions, window or rejection settings cannot be applied (decisions are then empty); null when fine. */
  settingsError: string | null;
  /** The Recipe screen's fields as entered. */
  draft: RecipeDraft;
  run: RunState;
  /** Counts recordings opened (`load`): the controller starts a new history and looks up a saved workspace. */
  openCount: number;
}

export interface WorkspaceActions {
  set: (patch: Partial<WorkspaceData>) => void;
  /** The recording to analyse: events relabelled to condition names, rejected epochs left out. */
  analysisRecording: () => Recording | null;
  /**
   * Puts a freshly opened recording in place, keeping conditions whose labels it also has. `fingerprint` null: it
   * is still being computed and arrives through `fingerprintKnown`.
   */
  load: (opened: { recording: Recording; local: LocalRecordingInfo; fingerprint: string | null }) => void;
  /** The late fingerprint of the recording opened as number `openCount` (ignored when another one is open since). */
  fingerprintKnown: (openCount: number, fingerprint: string) => void;
  /** How far the late fingerprint of opening `openCount` is, or why it failed. */
  fingerprintWaits: (openCount: number, wait: NonNullable<WorkspaceData['fingerprintWait']>) => void;
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
  setDraft: (patch: Partial<RecipeDraft>) => void;
  setRun: (patch: Partial<RunState>) => void;
  /** Marks the User Timing start of a baseline change, then applies it. */
  setBaseline: (baseline: { start: number; end: number }) => void;
}

export type WorkspaceState = WorkspaceData & WorkspaceActions;

export const INITIAL_WORKSPACE: WorkspaceData = {
  ...DEFAULT_VIEW,
  recording: null,
  local: null,
  fingerprint: null,
  fingerprintWait: null,
  subjectCode: '',
  conditions: [],
  // 3 s around the event: room for a −0.5 … −0.2 s baseline clear of the edge zone down to 3 Hz (recipe defaults).
  epochWindow: { start: -1, end: 2 },
  rejection: defaultRejection,
  conditioning: defaultConditioning,
  eventSelection: null,
  decisions: [],
  settingsError: null,
  draft: DEFAULT_DRAFT,
  run: { status: 'idle', progress: [], message: null },
  openCount: 0,
};

export const useWorkspace = create<WorkspaceState>((set, get) => ({
  ...INITIAL_WORKSPACE,
  set: (patch) => set(patch),
  analysisRecording: () => analysisRecordingOf(get()),
  load: ({ recording: opened, local, fingerprint }) => {
    // The core compares a recipe's recording.fingerprint with this, in the browser as on the command line.
    const recording: Recording = fingerprint === null ? { ...opened } : { ...opened, fingerprint };
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
    const fingerprintWait = fingerprint === null ? { state: 'computing' as const, fraction: 0 } : null;
    set({ openCount: get().openCount + 1, recording, local, fingerprint, fingerprintWait, conditions, rejection, conditioning, eventSelection: null, ...decideEpochs({ ...get(), recording, conditions, rejection, conditioning }) });
  },
  fingerprintKnown: (openCount, fingerprint) => {
    const { recording } = get();
    if (get().openCount !== openCount || recording === null || get().fingerprint !== null) return;
    // The recording object stays: only its name is filled in (the core compares a recipe's recording.fingerprint
    // with it at a run), so what is keyed by the object (its conditioned samples, the plan) stays valid.
    recording.fingerprint = fingerprint;
    set({ fingerprint, fingerprintWait: null });
  },
  fingerprintWaits: (openCount, wait) => {
    if (get().openCount === openCount && get().fingerprint === null && get().recording !== null) set({ fingerprintWait: wait });
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
    let next: Recording;
    let selectionWarnings: string[];
    try {
      ({ recording: next, warnings: selectionWarnings } = selectionOf(recording, local.eventTable, spec));
    } catch (error) {
      return error instanceof Error ? error.message : String(error);
    }
    const events = next.events;
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
    set({ recording: next, local: { ...local, selectionWarnings }, eventSelection: spec, conditions, rejection, ...decideEpochs({ ...get(), recording: next, conditions, rejection }) });
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
  setDraft: (patch) => set({ draft: { ...get().draft, ...patch } }),
  setRun: (patch) => set({ run: { ...get().run, ...patch } }),
  setBaseline: (baseline) => {
    if (typeof performance !== 'undefined') performance.mark('tidemark:baseline-input');
    set({ baseline });
  },
}));

/**
 * The open recording's fingerprint once it is known: at once when it is, after a large file's hashing otherwise;
 * null when that hashing fails or another recording is opened meanwhile (nothing keyed by it should happen then).
 */
export function fingerprintOfOpenRecording(): Promise<string | null> {
  const { fingerprint, openCount, recording } = useWorkspace.getState();
  if (fingerprint !== null || recording === null) return Promise.resolve(fingerprint);
  return new Promise((resolve) => {
    const stop = useWorkspace.subscribe((s) => {
      if (s.openCount === openCount && s.fingerprint === null && s.fingerprintWait?.state !== 'failed') return;
      stop();
      resolve(s.openCount === openCount ? s.fingerprint : null);
    });
  });
}

/** The workspace's recipe, made afresh (not a hook selector: call it on `getState()` or inside `useMemo`). */
export const recipeOf = (s: WorkspaceData): RecipeInput => toRecipe(s);
