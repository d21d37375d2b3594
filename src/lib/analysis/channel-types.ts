import { AnalysisInputError } from './errors';
import type { Recording } from './recording';

/**
 * What a signal measures. Brain signals (`eeg`, `meg-magnetometer`, `meg-gradiometer`, `intracranial`) are
 * decomposed, referenced and checked for rejection by default; the others (eye, heart and muscle electrodes,
 * stimulus or trigger lines, anything else) only when a recipe names them.
 */
export const CHANNEL_TYPES = ['eeg', 'eog', 'ecg', 'emg', 'meg-magnetometer', 'meg-gradiometer', 'intracranial', 'stimulus', 'other'] as const;
export type ChannelType = (typeof CHANNEL_TYPES)[number];

const BRAIN: ReadonlySet<ChannelType> = new Set(['eeg', 'meg-magnetometer', 'meg-gradiometer', 'intracranial']);

export function isBrainType(type: ChannelType): boolean {
  return BRAIN.has(type);
}

/** Units a channel's samples can be in: µV for electrodes; fT and fT/cm keep MEG's field and gradient units. */
export type ChannelUnit = 'µV' | 'fT' | 'fT/cm';

// EDF+ signal-type words (Kemp & Olivan, 2003, Clin Neurophysiol 114:1755–1761, §2.1.3.1: "EEG", "ECG", "EOG",
// "ERG", "EMG", "MEG", "MCG", "EP", "Temp", "Resp", "SaO2", "Light", "Sound", "Event"), plus the words
// intracranial recordings commonly use (common practice: "SEEG", "ECOG", "IEEG").
const TYPE_WORDS: Readonly<Record<string, ChannelType | 'meg'>> = {
  EEG: 'eeg',
  ECG: 'ecg',
  EKG: 'ecg',
  EOG: 'eog',
  EMG: 'emg',
  MEG: 'meg',
  SEEG: 'intracranial',
  ECOG: 'intracranial',
  IEEG: 'intracranial',
  EVENT: 'stimulus',
  ERG: 'other',
  MCG: 'other',
  EP: 'other',
  TEMP: 'other',
  RESP: 'other',
  SAO2: 'other',
  LIGHT: 'other',
  SOUND: 'other',
};

// Label conventions without a type word (common practice in clinical and research montages).
const LABEL_RULES: readonly [RegExp, ChannelType][] = [
  [/^(ECG|EKG)/i, 'ecg'],
  [/^([HV]EOG|EOG|LOC$|ROC$)/i, 'eog'],
  [/^(EMG|CHIN)/i, 'emg'],
  [/^(STI|TRIG|STATUS$|TRIGGER|EVENT|MARKER|DC\d)/i, 'stimulus'],
  [/^(RESP|TEMP|SPO2|SAO2|PLETH|PULSE|LIGHT|SOUND|PHOTIC|POSITION|SNORE|FLOW|THOR|ABDO|BPM|HR$)/i, 'other'],
];

/**
 * The type of a signal from its EDF+ label and unit: the label's signal-type word first ("EEG Fz", "EOG ROC",
 * "MEG 0113"), then label conventions ("EKG", "HEOG", "Chin1", "STI 014", "Resp"), then the unit (fT → magnetometer,
 * fT/cm → gradiometer). Anything else is `eeg`, the common case for 10-20 names. A person can change every type.
 */
export function inferChannelType(label: string, unit: ChannelUnit = 'µV'): ChannelType {
  const trimmed = label.trim();
  const word = /^([A-Za-z0-9]+)\s+\S/.exec(trimmed);
  const byWord = word === null ? undefined : TYPE_WORDS[word[1].toUpperCase()];
  if (byWord === 'meg') return unit === 'fT/cm' ? 'meg-gradiometer' : 'meg-magnetometer';
  if (byWord !== undefined) return byWord;
  if (unit === 'fT') return 'meg-magnetometer';
  if (unit === 'fT/cm') return 'meg-gradiometer';
  if (/^MEG/i.test(trimmed)) return 'meg-magnetometer';
  for (const [pattern, type] of LABEL_RULES) if (pattern.test(trimmed)) return type;
  return 'eeg';
}

/** The recipe's `signals` extension: type changes by channel name, and channels marked bad. */
export interface SignalsSpec {
  types?: Readonly<Record<string, ChannelType>>;
  bad?: readonly string[];
}

export interface ResolvedChannels {
  types: ChannelType[];
  units: ChannelUnit[];
  bad: boolean[];
  /** Indices of the good brain channels, in recording order. */
  goodBrain: number[];
}

/** A channel's unit in words for messages and plots: `µV`, `fT`, `fT/cm`. */
export function unitOf(recording: Recording, c: number): ChannelUnit {
  return recording.channelUnits?.[c] ?? 'µV';
}

/**
 * Each channel's type (the reader's inference, then the recipe's `signals.types`), unit and bad mark. Throws
 * AnalysisInputError naming the field when `signals` names a channel the recording does not have.
 */
export function resolveChannels(recording: Recording, signals: SignalsSpec | undefined): ResolvedChannels {
  const names = recording.channelNames;
  const units = names.map((_, c) => unitOf(recording, c));
  const types = names.map((name, c) => recording.channelTypes?.[c] ?? inferChannelType(name, units[c]));
  for (const [name, type] of Object.entries(signals?.types ?? {})) {
    const c = names.indexOf(name);
    if (c < 0) throw new AnalysisInputError(`signals.types[${JSON.stringify(name)}]`, `names no signal in the recording (signals: ${shortList(names)})`);
    if (!(CHANNEL_TYPES as readonly string[]).includes(type)) {
      throw new AnalysisInputError(`signals.types[${JSON.stringify(name)}]`, `is "${type}", not a channel type (${CHANNEL_TYPES.join(', ')})`);
    }
    types[c] = type;
  }
  const bad = names.map(() => false);
  (signals?.bad ?? []).forEach((name, i) => {
    const c = names.indexOf(name);
    if (c < 0) throw new AnalysisInputError(`signals.bad[${i}]`, `names no signal in the recording ("${name}"; signals: ${shortList(names)})`);
    bad[c] = true;
  });
  const goodBrain: number[] = [];
  types.forEach((t, c) => {
    if (isBrainType(t) && !bad[c]) goodBrain.push(c);
  });
  return { types, units, bad, goodBrain };
}

export function shortList(names: readonly string[]): string {
  return names.slice(0, 12).join(', ') + (names.length > 12 ? ', …' : '');
}
