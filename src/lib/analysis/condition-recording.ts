import { isBrainType, resolveChannels, type ChannelType, type ChannelUnit, type SignalsSpec } from './channel-types';
import type { Recording } from './recording';

/** The recipe fields that change the continuous recording before it is cut into epochs. */
export interface ConditionSpec {
  signals?: SignalsSpec;
}

export interface ConditionedRecording {
  /** Bad channels left out, every channel's type and unit set; samples shared with the input where unchanged. */
  recording: Recording & { channelTypes: ChannelType[]; channelUnits: ChannelUnit[] };
  /** Names of the channels marked bad (left out). */
  bad: string[];
  warnings: string[];
}

// One conditioned recording per input recording, for the last spec asked: the Recipe screen checks a recipe on
// every edit, and conditioning must not run again when only the baseline or the frequencies changed.
const cache = new WeakMap<Recording, { key: string; result: ConditionedRecording }>();

/**
 * The continuous recording as the recipe conditions it before epoching (DEVELOPERS.md, "Channel types"): each
 * channel's type resolved (reader's inference, then `signals.types`), channels in `signals.bad` left out.
 * Pure in (recording, spec); throws AnalysisInputError naming the field.
 */
export function conditionRecording(recording: Recording, spec: ConditionSpec): ConditionedRecording {
  const key = JSON.stringify({ signals: spec.signals ?? null });
  const hit = cache.get(recording);
  if (hit !== undefined && hit.key === key) return hit.result;
  const resolved = resolveChannels(recording, spec.signals);
  const keep: number[] = [];
  const bad: string[] = [];
  recording.channelNames.forEach((name, c) => (resolved.bad[c] ? bad.push(name) : keep.push(c)));
  const out: ConditionedRecording['recording'] = {
    ...recording,
    channelNames: keep.map((c) => recording.channelNames[c]),
    data: keep.map((c) => recording.data[c]),
    channelTypes: keep.map((c) => resolved.types[c]),
    channelUnits: keep.map((c) => resolved.units[c]),
  };
  const result: ConditionedRecording = { recording: out, bad, warnings: [] };
  cache.set(recording, { key, result });
  return result;
}

/** Indices of the brain channels of a conditioned recording (bad channels are already left out). */
export function brainChannels(recording: { channelTypes: readonly ChannelType[] }): number[] {
  const out: number[] = [];
  recording.channelTypes.forEach((t, c) => {
    if (isBrainType(t)) out.push(c);
  });
  return out;
}
