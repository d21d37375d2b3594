import { create } from 'zustand';
import type { Recording } from '../lib/analysis/recording';

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
  /** 'any': an epoch is rejected when any analysed channel breaks a rule. */
  scope: 'any' | 'channel';
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
  set: (patch: Partial<Omit<SourceState, 'set' | 'analysisRecording'>>) => void;
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
  analysisRecording: () => {
    const { recording, decisions } = get();
    if (!recording) return null;
    const events = decisions
      .filter((d) => !d.rejected)
      .map((d) => ({ ...recording.events[d.eventIndex], label: d.condition }));
    return { ...recording, events };
  },
  set: (patch) => set(patch),
}));
