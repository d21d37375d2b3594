import type { Recording } from '../../lib/analysis/recording';
import type { ConditioningSettings, Condition, EpochDecision, LocalRecordingInfo } from '../../lib/client/workspace/source-rules';
import { formatBytes, formatSeconds } from './format';
import type { SourceStepId } from './SourceStep';

export const STEP_TITLES: Record<SourceStepId, string> = {
  recording: 'The recording',
  channels: 'Channels, reference and filters',
  events: 'Events to conditions',
  epochs: 'Epochs over the recording',
  session: 'Analysis session',
};

/** Channels starts folded when every channel has one type as read from the file (nothing to sort out). */
export function defaultFolds(recording: Recording | null): ReadonlySet<SourceStepId> {
  const types = recording?.channelTypes;
  return new Set<SourceStepId>(types !== undefined && types.length > 0 && new Set(types).size === 1 ? ['channels'] : []);
}

/** One line per step of where it stands, for the step strip and each step's title line. */
export function sourceDigests(
  recording: Recording,
  local: LocalRecordingInfo,
  conditioning: ConditioningSettings,
  conditions: Condition[],
  decisions: EpochDecision[],
  epochWindow: { start: number; end: number },
  mayCreateSessions: boolean,
): Record<SourceStepId, string> {
  const samples = recording.data[0]?.length ?? 0;
  const kept = decisions.filter((d) => !d.rejected).length;
  const byHand = decisions.filter((d) => d.manual !== null).length;
  const reference = conditioning.reference === null ? 'as recorded' : conditioning.reference.kind.replace(/-/g, ' ');
  return {
    recording: `${recording.channelNames.length} channels · ${recording.sampleRateHz} Hz · ${formatSeconds(samples / recording.sampleRateHz)} · ${formatBytes(local.sizeBytes)}`,
    channels: `${conditioning.bad.length === 0 ? 'no bad channels' : `${conditioning.bad.length} bad`} · reference ${reference} · ${conditioning.filters === null ? 'no filters' : 'filtered'}`,
    events: `${recording.events.length} events · ${conditions.length === 1 ? '1 condition' : `${conditions.length} conditions`} · window ${epochWindow.start} … ${epochWindow.end} s`,
    epochs: `${decisions.length} epochs · ${kept} kept · ${decisions.length - kept} rejected${byHand > 0 ? ` (${byHand} decided by hand)` : ''}`,
    session: mayCreateSessions ? 'subject code and fingerprint only' : 'analysts start sessions',
  };
}
