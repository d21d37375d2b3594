import { isBrainType, resolveChannels, type ChannelType, type ChannelUnit, type ResolvedChannels } from '../../analysis/channel-types';
import { conditionRecording } from '../../analysis/condition-recording';
import { countLabels, type LabelCount } from '../../analysis/conditions';
import { epochLength } from '../../analysis/epochs';
import type { Recording } from '../../analysis/recording';
import { tallyByCondition, type ConditionTally } from '../../analysis/rejection';
import { roundHalfUp } from '../../analysis/rounding';
import { conditioningSpec, type ConditioningSettings, type EpochDecision, type RejectionSettings } from './source-rules';

// What the Source and Recipe screens show of the open recording, derived from the workspace store's state by the
// core's own rules (channel types, labels, epoch grid, tally), so the screens paint and never call the core.

export type { ChannelType, ChannelUnit } from '../../analysis/channel-types';
export type { ConditionTally } from '../../analysis/rejection';
export type { LabelCount } from '../../analysis/conditions';

// The file's own reading (types inferred from labels and units) changes only with the recording.
const fromFile = new WeakMap<Recording, ResolvedChannels>();
function inferredOf(recording: Recording): ResolvedChannels {
  let hit = fromFile.get(recording);
  if (hit === undefined) {
    hit = resolveChannels(recording, undefined);
    fromFile.set(recording, hit);
  }
  return hit;
}

export interface ChannelRow {
  name: string;
  /** The type in use: changed by hand, else as read from the file. */
  type: ChannelType;
  /** The type read from the file. */
  fromFile: ChannelType;
  unit: ChannelUnit;
  bad: boolean;
}

/** The Channels step: every channel's row, how many brain channels are in use, and the reference's candidates. */
export interface ChannelsView {
  rows: ChannelRow[];
  /** Good channels of a brain type: analysed, referenced and checked for rejection. */
  analysed: number;
  /** Good channels in µV (scalp or intracranial electrodes) and good intracranial contacts, for the reference. */
  electrodes: string[];
  intracranial: string[];
}

export function channelsView(recording: Recording, conditioning: ConditioningSettings): ChannelsView {
  const inferred = inferredOf(recording);
  const rows = recording.channelNames.map((name, c): ChannelRow => ({
    name,
    type: conditioning.types[name] ?? inferred.types[c],
    fromFile: inferred.types[c],
    unit: inferred.units[c],
    bad: conditioning.bad.includes(name),
  }));
  const good = rows.filter((r) => !r.bad);
  return {
    rows,
    analysed: good.filter((r) => isBrainType(r.type)).length,
    electrodes: good.filter((r) => r.unit === 'µV').map((r) => r.name),
    intracranial: good.filter((r) => r.type === 'intracranial').map((r) => r.name),
  };
}

/** The conditioning's `types` with channel `name` set to `type`: only changes from the file are kept. */
export function typesWith(recording: Recording, conditioning: ConditioningSettings, name: string, type: ChannelType): Record<string, ChannelType> {
  const types = { ...conditioning.types };
  const c = recording.channelNames.indexOf(name);
  if (c >= 0 && type === inferredOf(recording).types[c]) delete types[name];
  else types[name] = type;
  return types;
}

/** The conditioning's `bad` list with channel `name` marked bad or not. */
export function badWith(conditioning: ConditioningSettings, name: string, bad: boolean): string[] {
  const rest = conditioning.bad.filter((n) => n !== name);
  return bad ? [...rest, name] : rest;
}

/** Distinct event labels with their counts, in order of first appearance (the core's `countLabels`). */
export function labelCounts(recording: Recording): LabelCount[] {
  return countLabels(recording.events);
}

/** One epoch's span on the overview trace, in samples of the recording. */
export interface EpochSpan {
  startSample: number;
  endSample: number;
  rejected: boolean;
  selected: boolean;
}

/** Every decided epoch's span on the recording's sample grid (onset + window start, the core's epoch length). */
export function epochSpans(recording: Recording, decisions: readonly EpochDecision[], epochWindow: { start: number; end: number }, selectedEvent: number | null): EpochSpan[] {
  const fs = recording.sampleRateHz;
  const length = epochLength(epochWindow.start, epochWindow.end, fs);
  const offset = roundHalfUp(epochWindow.start * fs);
  return decisions.map((d) => {
    const start = roundHalfUp(d.onsetSeconds * fs) + offset;
    return { startSample: start, endSample: start + length, rejected: d.rejected, selected: d.eventIndex === selectedEvent };
  });
}

/**
 * The channel types the rejection rules can meet, each with its unit, in recording order: brain types (checked
 * across channels), or the types of the hand-picked channels when the rules check chosen channels only.
 */
export function rejectionTypes(recording: Recording, conditioning: ConditioningSettings, rejection: RejectionSettings): [ChannelType, ChannelUnit][] {
  const resolved = resolveChannels(recording, { types: conditioning.types });
  const picked = new Set(rejection.scope === 'channel' ? (rejection.channels ?? []) : []);
  const present = new Map<ChannelType, ChannelUnit>();
  recording.channelNames.forEach((n, c) => {
    if (rejection.scope === 'channel' ? picked.has(n) : isBrainType(resolved.types[c])) present.set(resolved.types[c], resolved.units[c]);
  });
  return [...present];
}

/** The rejection's `byType` with one type's limits set, or removed when `limits` is undefined. */
export function byTypeWith(rejection: RejectionSettings, type: ChannelType, limits: { peakToPeak: number | null; flat: number | null } | undefined): NonNullable<RejectionSettings['byType']> {
  const byType = { ...(rejection.byType ?? {}) };
  if (limits === undefined) delete byType[type];
  else byType[type] = limits;
  return byType;
}

/** Kept and rejected epochs per condition, with those outside the recording or across a gap (the core's tally). */
export function conditionTally(decisions: readonly EpochDecision[]): ConditionTally[] {
  return tallyByCondition(decisions.map((d) => ({ condition: d.condition, rejected: d.rejected, fit: d.fit ?? 'fits' })));
}

// Weakly held: a recording that is no longer open is not kept alive for this.
const lastChoices = new WeakMap<Recording, { conditioning: ConditioningSettings; out: { candidates: string[]; brain: string[] } }>();

/**
 * The channels a recipe can name: the recording as conditioned (bad ones out, bipolar pairs in), and of those the
 * brain channels; the file's channels, all counted as brain, when the conditioning cannot be applied. Remembered for
 * the last recording and conditioning, so a screen repaint does not condition the recording again.
 */
export function recipeChannelChoices(recording: Recording, conditioning: ConditioningSettings): { candidates: string[]; brain: string[] } {
  const hit = lastChoices.get(recording);
  if (hit !== undefined && hit.conditioning === conditioning) return hit.out;
  let out: { candidates: string[]; brain: string[] };
  try {
    const conditioned = conditionRecording(recording, conditioningSpec(conditioning)).recording;
    out = { candidates: conditioned.channelNames, brain: conditioned.channelNames.filter((_, c) => isBrainType(conditioned.channelTypes[c])) };
  } catch {
    out = { candidates: recording.channelNames, brain: recording.channelNames };
  }
  lastChoices.set(recording, { conditioning, out });
  return out;
}
