import type { Recording } from '../../lib/analysis/recording';
import { openedWarnings, type LocalRecordingInfo } from '../../lib/client/workspace/source-rules';
import { useWorkspace } from '../../lib/client/workspace/store';
import { formatBytes, formatSeconds } from './format';

/** The marker on everything that identifies a recording: it is shown here and never sent. */
export function StaysLocal() {
  return (
    <span className="role-badge whitespace-nowrap border-kelp text-kelp-deep" title="Shown on this device only; never put into any request">
      ⌂ stays on this device
    </span>
  );
}

interface Props {
  recording: Recording;
  local: LocalRecordingInfo;
  /** Null while a large file's fingerprint is still computed (the line then says how far it is). */
  fingerprint: string | null;
  origin: string;
}

/** The fingerprint, or the quiet state of one still being computed (or failed) after the file is already shown. */
function FingerprintValue({ fingerprint }: { fingerprint: string | null }) {
  const wait = useWorkspace((s) => s.fingerprintWait);
  if (fingerprint !== null) return <span className="font-mono text-xs break-all" data-testid="fingerprint">{fingerprint}</span>;
  if (wait?.state === 'failed') {
    return (
      <span className="notice notice-warn text-sm" role="alert" data-testid="fingerprint-failed">
        {wait.message}
      </span>
    );
  }
  const percent = Math.floor((wait?.fraction ?? 0) * 100);
  return (
    <span className="flex flex-wrap items-center gap-x-2 gap-y-1 text-xs text-ink-soft" role="status" data-testid="fingerprint-pending">
      <label htmlFor="fingerprint-progress" className="whitespace-nowrap font-mono">
        fingerprint … {percent} %
      </label>
      <progress id="fingerprint-progress" max={100} value={percent} className="h-1.5 w-24 accent-kelp" />
      <span className="basis-full">The workspace is kept in this browser, and a session can start, once it is known.</span>
    </span>
  );
}

export default function LocalDetails({ recording, local, fingerprint, origin }: Props) {
  const samples = recording.data[0]?.length ?? 0;
  const rows: [string, React.ReactNode, boolean][] = [
    ['File name', <span className="break-all">{local.fileName}</span>, true],
  ];
  if (local.identifying) {
    rows.push(['Patient field', <span className="font-mono break-all" data-testid="patient-field">{local.identifying.patient || '(empty)'}</span>, true]);
    rows.push(['Recording field', <span className="font-mono break-all">{local.identifying.recording || '(empty)'}</span>, true]);
  }
  if (local.startDateTime) rows.push(['Start', <span className="font-mono">{local.startDateTime}</span>, true]);
  rows.push(['Format', `${local.format.toUpperCase()} · ${formatBytes(local.sizeBytes)} · ${origin}`, false]);
  rows.push([
    'Signals',
    `${recording.channelNames.length} channels at ${recording.sampleRateHz} Hz · ${formatSeconds(samples / recording.sampleRateHz)} · ${recording.events.length} events`,
    false,
  ]);
  const readingChoices = [
    ...(local.excludedSignals ?? []).map((label) => `${label} left out`),
    ...(local.mappedSignals ?? []).map((m) => `${m.signal} × ${m.factor} µV (unit ${m.dimension === '' ? 'empty' : `“${m.dimension}”`})`),
  ];
  if (readingChoices.length > 0) {
    rows.push(['Your reading choices', <span data-testid="reading-choices">{readingChoices.join(' · ')}</span>, false]);
  }
  if (recording.gapSampleIndices?.length) rows.push(['Gaps', `${recording.gapSampleIndices.length} (discontinuous recording)`, false]);
  rows.push(['Fingerprint (SHA-256)', <FingerprintValue fingerprint={fingerprint} />, false]);
  return (
    <div className="grid gap-3">
      <dl className="grid gap-x-4 gap-y-2 text-sm sm:grid-cols-[max-content_1fr]">
        {rows.map(([term, value, local]) => (
          <div key={term} className="contents">
            <dt className="font-semibold">{term}</dt>
            <dd className="flex flex-wrap items-baseline gap-2">
              {value}
              {local && <StaysLocal />}
            </dd>
          </div>
        ))}
      </dl>
      <p className="text-xs text-ink-soft">
        The server learns only the fingerprint and the subject code you type, when you create an analysis session. Channels:{' '}
        <span className="font-mono">{recording.channelNames.join(', ')}</span>
      </p>
      {local.ignoredSignals.length > 0 && (
        <p className="notice text-sm">Listed but not analysed (another sample rate): {local.ignoredSignals.join(', ')}</p>
      )}
      {openedWarnings(local).map((w) => (
        <p key={w} className="notice notice-warn text-sm" data-testid="intake-warning">
          {w}
        </p>
      ))}
    </div>
  );
}
