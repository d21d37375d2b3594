import { create } from 'zustand';
import type { Recording } from '../lib/analysis/recording';
import { assignConditions } from '../lib/analysis/conditions';
import { applyOverride, checkEpochs, type EpochFit } from '../lib/analysis/rejection';

/**
 * The Source screen's state: the recording opened on this device and how its events become conditions and epochs.
 * Everything here stays in the browser. `local` holds what identifies the recording (file name, header patient and
 * recording fields) and must never be put into a request; the server learns only `fingerprint` and `subjectCode`.
 *
 * Contract between the Source screen (which fills this store) and the Recipe/Maps/Spectrum/Bands screens (which read
 * it): read `recording`, `conditions`, `epochWindow`, `rejection`, and call `analysisRecording()` for the recording
 * to analyse — its events are relabelled with condition names and hold only the kept epochs.
 */
export interface LocalRecordingInfo {
  fileName: string;
  sizeBytes: number;
  format: 'edf' | 'edf+c' | 'edf+d' | 'csv' | 'tsv';
  /** Header patient / recording identification (EDF), shown locally with a "stays on this device" marker. */
  identifying: { patient: string; recording: string } | null;
  startDateTime: string | null;
  ignoredSignals: string[];
  warnings: string[];
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
  /** Manual decisions by epoch key `${eventIndex}` (index into recording.events), overriding the rules. */
  overrides: Record<string, 'keep' | 'reject'>;
}

export interface EpochDecision {
  eventIndex: number;
  condition: string;
  onsetSeconds: number;
  rejected: boolean;
  /** Why: e.g. "peak-to-peak 212 µV on Fz", "flat on O2", "manual", "outside the recording". */
  reasons: string[];
  /** Whether the epoch fits the recording ('outside': runs past an end; 'gap': spans an EDF+D gap). */
  fit?: EpochFit;
  /** The rules' verdict before any manual override. */
  rejectedByRules?: boolean;
  manual?: 'keep' | 'reject' | null;
  /** Largest peak-to-peak amplitude over the checked channels (µV) and where; null when the epoch does not fit. */
  peakToPeakMicrovolts?: number | null;
  peakToPeakChannel?: string | null;
  /** Smallest standard deviation over the checked channels (µV) and where. */
  minStdMicrovolts?: number | null;
  minStdChannel?: string | null;
}

export interface SourceState {
  recording: Recording | null;
  local: LocalRecordingInfo | null;
  /** SHA-256 of the file's bytes, lowercase hex. */
  fingerprint: string | null;
  subjectCode: string;
  conditions: Condition[];
  epochWindow: { tmin: number; tmax: number };
  rejection: RejectionSettings;
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
  setEpochWindow: (epochWindow: { tmin: number; tmax: number }) => void;
  setRejection: (patch: Partial<Omit<RejectionSettings, 'overrides'>>) => void;
  /** A manual decision for one epoch; null returns it to the rules. */
  setOverride: (eventIndex: number, decision: 'keep' | 'reject' | null) => void;
  /** Recomputes `decisions` from the recording, conditions, window and rejection settings. */
  recompute: () => void;
}

type Actions = 'load' | 'setConditions' | 'setEpochWindow' | 'setRejection' | 'setOverride' | 'recompute';

/** The decisions for the current state, or the reason there are none. Pure: the store calls it on every change. */
export function decideEpochs(
  state: Pick<SourceState, 'recording' | 'conditions' | 'epochWindow' | 'rejection'>,
): { decisions: EpochDecision[]; settingsError: string | null } {
  const { recording, conditions, epochWindow, rejection } = state;
  if (!recording || conditions.length === 0) return { decisions: [], settingsError: null };
  try {
    const assignments = assignConditions(recording.events, conditions);
    const channelIndices =
      rejection.scope === 'channel'
        ? (rejection.channels ?? []).map((name) => recording.channelNames.indexOf(name)).filter((i) => i >= 0)
        : null;
    const checks = checkEpochs(recording, assignments, epochWindow, {
      peakToPeakMicrovolts: rejection.peakToPeakMicrovolts,
      flatMicrovolts: rejection.flatMicrovolts,
      channelIndices,
    });
    const decisions = checks.map((c): EpochDecision => {
      const verdict = applyOverride(c, rejection.overrides[String(c.eventIndex)]);
      return {
        eventIndex: c.eventIndex,
        condition: c.condition,
        onsetSeconds: c.onsetSeconds,
        rejected: verdict.rejected,
        reasons: verdict.reasons,
        fit: c.fit,
        rejectedByRules: c.rejectedByRules,
        manual: verdict.manual,
        peakToPeakMicrovolts: c.peakToPeakMicrovolts,
        peakToPeakChannel: c.peakToPeakChannel,
        minStdMicrovolts: c.minStdMicrovolts,
        minStdChannel: c.minStdChannel,
      };
    });
    return { decisions, settingsError: null };
  } catch (error) {
    return { decisions: [], settingsError: error instanceof Error ? error.message : String(error) };
  }
}

export const defaultRejection: RejectionSettings = { peakToPeakMicrovolts: 150, flatMicrovolts: 0.5, scope: 'any', overrides: {} };

export const useSourceStore = create<SourceState>((set, get) => ({
  recording: null,
  local: null,
  fingerprint: null,
  subjectCode: '',
  conditions: [],
  epochWindow: { tmin: -0.5, tmax: 1.5 },
  rejection: defaultRejection,
  decisions: [],
  settingsError: null,
  analysisRecording: () => {
    const { recording, decisions } = get();
    if (!recording) return null;
    const events = decisions
      .filter((d) => !d.rejected)
      .map((d) => ({ ...recording.events[d.eventIndex], label: d.condition }));
    return { ...recording, events };
  },
  set: (patch) => set(patch),
  load: ({ recording, local, fingerprint }) => {
    const labels = new Set(recording.events.map((e) => e.label));
    const conditions = get()
      .conditions.map((c) => ({ ...c, labels: c.labels.filter((l) => labels.has(l)) }))
      .filter((c) => c.labels.length > 0);
    const rejection = { ...get().rejection, overrides: {}, channels: (get().rejection.channels ?? []).filter((n) => recording.channelNames.includes(n)) };
    set({ recording, local, fingerprint, conditions, rejection, ...decideEpochs({ ...get(), recording, conditions, rejection }) });
  },
  setConditions: (conditions) => set({ conditions, ...decideEpochs({ ...get(), conditions }) }),
  setEpochWindow: (epochWindow) => set({ epochWindow, ...decideEpochs({ ...get(), epochWindow }) }),
  setRejection: (patch) => {
    const rejection = { ...get().rejection, ...patch };
    set({ rejection, ...decideEpochs({ ...get(), rejection }) });
  },
  setOverride: (eventIndex, decision) => {
    const overrides = { ...get().rejection.overrides };
    if (decision === null) delete overrides[String(eventIndex)];
    else overrides[String(eventIndex)] = decision;
    const rejection = { ...get().rejection, overrides };
    set({ rejection, ...decideEpochs({ ...get(), rejection }) });
  },
  recompute: () => set(decideEpochs(get())),
}));
