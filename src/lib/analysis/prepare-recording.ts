import { isBrainType, resolveChannels, type ChannelType } from './channel-types';
import { assignConditions, type ConditionSpec } from './conditions';
import { AnalysisInputError } from './errors';
import { eventKey, parseEventKey } from './event-key';
import type { Recording, RecordingEvent } from './recording';
import { applyOverride, checkEpochs, tallyByCondition, type EpochFit } from './rejection';

/** The part of a recipe that decides which epochs are analysed (recipe fields `epochs`, `conditions`, `rejection`). */
export interface PrepareSpec {
  /** `events` may name conditions or plain labels; a plain label not claimed by a condition is its own condition. */
  epochs: { events?: readonly string[]; start: number; end: number };
  /** Condition name → event labels, in the order the conditions are listed. */
  conditions?: Readonly<Record<string, readonly string[]>>;
  rejection?: {
    peakToPeakMicrovolts: number | null;
    flatMicrovolts: number | null;
    /** 'any': every brain channel is checked (EEG, MEG, intracranial); 'channel': only `channels`, of any type. */
    scope: 'any' | 'channel';
    channels?: readonly string[];
    /** Per channel type, limits in that type's unit replacing the two µV limits (µV types) or adding some (MEG). */
    byType?: Readonly<Partial<Record<ChannelType, { peakToPeak: number | null; flat: number | null }>>>;
    /** Manual decisions by event key (event-key.ts); they win over the rules for epochs that fit the recording. */
    overrides?: Readonly<Record<string, 'keep' | 'reject'>>;
  };
}

/** The verdict on one event that belongs to a condition. */
export interface EpochDecision {
  eventIndex: number;
  /** The stable key of the event (event-key.ts), as recipe overrides name it. */
  key: string;
  condition: string;
  onsetSeconds: number;
  rejected: boolean;
  /** Why: e.g. "peak-to-peak 212 µV on Fz", "flat on O2", "manual", "outside the recording". */
  reasons: string[];
  /** Whether the epoch fits the recording ('outside': runs past an end; 'gap': spans an EDF+D gap). */
  fit: EpochFit;
  /** The rules' verdict before any manual override. */
  rejectedByRules: boolean;
  manual: 'keep' | 'reject' | null;
  /** Largest peak-to-peak amplitude over the checked channels (µV) and where; null when the epoch does not fit. */
  peakToPeakMicrovolts: number | null;
  peakToPeakChannel: string | null;
  /** Smallest standard deviation over the checked channels (µV) and where. */
  minStdMicrovolts: number | null;
  minStdChannel: string | null;
}

/** Per condition: epochs assigned, kept, left out by the rules or by hand, and dropped for not fitting. */
export interface ConditionCount {
  condition: string;
  total: number;
  kept: number;
  /** Fitting epochs left out (rules or a manual reject). */
  rejected: number;
  /** Of `rejected`, those a person rejected by hand; `manualKeeps` counts epochs kept against the rules. */
  manualRejects: number;
  manualKeeps: number;
  /** Epochs that run past either end of the recording, and epochs across a gap (never kept). */
  outside: number;
  gap: number;
}

export interface PreparedRecording {
  /** False when the spec has neither conditions nor rejection: `recording` is the input, untouched (contract path). */
  applied: boolean;
  /** Same samples; events relabelled to condition names, holding only the kept epochs, in event order. */
  recording: Recording;
  conditions: ConditionSpec[];
  decisions: EpochDecision[];
  counts: ConditionCount[];
}

function conditionList(spec: PrepareSpec): ConditionSpec[] {
  const list: ConditionSpec[] = Object.entries(spec.conditions ?? {}).map(([name, labels]) => ({ name, labels }));
  const names = new Set(list.map((c) => c.name));
  const claimed = new Map<string, string>();
  for (const c of list) for (const l of c.labels) claimed.set(l, c.name);
  (spec.epochs.events ?? []).forEach((entry, i) => {
    if (names.has(entry)) return;
    const owner = claimed.get(entry);
    if (owner !== undefined) throw new AnalysisInputError(`epochs.events[${i}]`, `"${entry}" is a label of condition "${owner}"; list the condition instead`);
    list.push({ name: entry, labels: [entry] });
    names.add(entry);
    claimed.set(entry, entry);
  });
  return list;
}

/** checkConditions names `conditions[i]`; the recipe keys conditions by name, so say `conditions["name"]`. */
function renamed(error: unknown, list: readonly ConditionSpec[], declared: number): unknown {
  if (!(error instanceof AnalysisInputError)) return error;
  const m = /^conditions\[(\d+)\](.*)$/.exec(error.field);
  if (m === null) return error;
  const i = Number(m[1]);
  const field = i < declared ? `conditions[${JSON.stringify(list[i].name)}]${m[2] === '.labels' ? '' : m[2]}` : `epochs.events`;
  return new AnalysisInputError(field, error.problem);
}

function requireOverrides(events: readonly RecordingEvent[], overrides: Readonly<Record<string, 'keep' | 'reject'>>): Map<number, 'keep' | 'reject'> {
  const byIndex = new Map<number, 'keep' | 'reject'>();
  for (const [key, decision] of Object.entries(overrides)) {
    const field = `rejection.overrides[${JSON.stringify(key)}]`;
    const parts = parseEventKey(key);
    if (parts === null) throw new AnalysisInputError(field, 'is not an event key "<index>@<onset seconds>:<label>"');
    const e = events[parts.index];
    if (e === undefined) throw new AnalysisInputError(field, `names event ${parts.index}, but the recording has ${events.length} events (was the recipe made on another recording?)`);
    if (e.label !== parts.label || Math.abs(e.onsetSeconds - parts.onsetSeconds) > 1e-6) {
      throw new AnalysisInputError(
        field,
        `names "${parts.label}" at ${parts.onsetSeconds} s, but event ${parts.index} of this recording is "${e.label}" at ${e.onsetSeconds} s (was the recipe made on another recording?)`,
      );
    }
    byIndex.set(parts.index, decision);
  }
  return byIndex;
}

/**
 * Applies a recipe's conditions and epoch rejection to a recording: every event whose label belongs to a condition
 * gets an epoch `[round(o·fs) + round(start·fs), … + round((end − start)·fs)]` (analysis contract); an epoch that does
 * not fit the recording is dropped; a fitting epoch is rejected by the peak-to-peak and flat rules of `checkEpochs`,
 * and a manual override then wins. The result holds the kept epochs' events relabelled to their condition names,
 * so `planRecipe` epochs by condition. This one function serves the Source screen, the browser runs and the CLI.
 */
export function prepareRecording(recording: Recording, spec: PrepareSpec): PreparedRecording {
  if (spec.conditions === undefined && spec.rejection === undefined) {
    return { applied: false, recording, conditions: [], decisions: [], counts: [] };
  }
  const declared = Object.keys(spec.conditions ?? {}).length;
  const conditions = conditionList(spec);
  let assignments;
  try {
    assignments = assignConditions(recording.events, conditions);
  } catch (error) {
    throw renamed(error, conditions, declared);
  }
  const rejection = spec.rejection ?? { peakToPeakMicrovolts: null, flatMicrovolts: null, scope: 'any' as const };
  const { types, units } = resolveChannels(recording, undefined);
  let channelIndices: number[];
  if (rejection.scope === 'channel') {
    channelIndices = (rejection.channels ?? []).map((name, i) => {
      const c = recording.channelNames.indexOf(name);
      if (c < 0) throw new AnalysisInputError(`rejection.channels[${i}]`, `names no signal in the recording ("${name}")`);
      return c;
    });
  } else {
    // Eye, heart and muscle channels would reject nearly every epoch by the scalp rule: only brain channels count.
    channelIndices = types.flatMap((t, c) => (isBrainType(t) ? [c] : []));
  }
  // Limits per checked channel: its type's own (rejection.byType, in the channel's unit), else the µV rules for a
  // µV channel; an MEG channel without limits of its type is not checked (a µV number means nothing in fT).
  const byType = rejection.byType ?? {};
  const limits = channelIndices.map((c) => {
    const own = byType[types[c]];
    if (own !== undefined) return own;
    return units[c] === 'µV' ? { peakToPeak: rejection.peakToPeakMicrovolts, flat: rejection.flatMicrovolts } : { peakToPeak: null, flat: null };
  });
  const overrides = requireOverrides(recording.events, rejection.overrides ?? {});
  const checks = checkEpochs(recording, assignments, spec.epochs, {
    peakToPeakMicrovolts: rejection.peakToPeakMicrovolts,
    flatMicrovolts: rejection.flatMicrovolts,
    channelIndices,
    limits,
  });
  const decisions = checks.map((c): EpochDecision => {
    const verdict = applyOverride(c, overrides.get(c.eventIndex));
    return {
      eventIndex: c.eventIndex,
      key: eventKey(c.eventIndex, recording.events[c.eventIndex]),
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
  const tallies = new Map(tallyByCondition(decisions).map((t) => [t.condition, t]));
  const counts = conditions.map((c): ConditionCount => {
    const name = c.name.trim();
    const t = tallies.get(name);
    const mine = decisions.filter((d) => d.condition === name);
    return {
      condition: name,
      total: t?.total ?? 0,
      kept: t?.kept ?? 0,
      rejected: (t?.rejected ?? 0) - (t?.outside ?? 0) - (t?.gap ?? 0),
      manualRejects: mine.filter((d) => d.manual === 'reject').length,
      // Kept by hand against the rules: a manual keep of an epoch the rules would have kept changes nothing.
      manualKeeps: mine.filter((d) => d.manual === 'keep' && d.rejectedByRules).length,
      outside: t?.outside ?? 0,
      gap: t?.gap ?? 0,
    };
  });
  const events = decisions.filter((d) => !d.rejected).map((d) => ({ ...recording.events[d.eventIndex], label: d.condition }));
  return { applied: true, recording: { ...recording, events }, conditions, decisions, counts };
}
