import { useCallback, useRef, useState } from 'react';
import type { WorkspaceProps } from './types';
import type { IntakeProblem, RecordingKind } from '../../lib/client/intake';
import { libraryFor, type LibraryEntry } from '../../lib/client/library';
import { errorMessageOf, send } from '../../lib/client/outbound';
import { openRecording, type Origin } from '../../lib/client/workspace/open-recording';
import OpenPanel, { type CsvChoice } from '../source/OpenPanel';
import DemoPicker, { type DemoSubject } from '../source/DemoPicker';
import LibraryPanel from '../source/LibraryPanel';
import LocalDetails from '../source/LocalDetails';
import ChannelsPanel from '../source/ChannelsPanel';
import ConditionsPanel from '../source/ConditionsPanel';
import EventTablePanel from '../source/EventTablePanel';
import OverviewTrace from '../source/OverviewTrace';
import RejectionPanel from '../source/RejectionPanel';
import SessionPanel from '../source/SessionPanel';
import UnitChoice, { withDecision, type UnitDecision } from '../source/UnitChoice';
import IntakeProgress, { type Busy } from '../source/IntakeProgress';
import IntakeProblemNotice from '../source/IntakeProblemNotice';
import { formatBytes } from '../source/format';
import { useWorkspace } from '../../lib/client/workspace/store';

/** The last open attempt, so a reading choice can open the same file again. */
interface Attempt {
  blob: Blob;
  fileName: string;
  kind: RecordingKind;
  from: Origin;
  events: { blob: Blob; name: string } | null;
  demoCode?: string;
}

export default function SourceScreen(props: WorkspaceProps) {
  const recording = useWorkspace((s) => s.recording);
  const local = useWorkspace((s) => s.local);
  const fingerprint = useWorkspace((s) => s.fingerprint);
  const conditions = useWorkspace((s) => s.conditions);
  const epochWindow = useWorkspace((s) => s.epochWindow);
  const rejection = useWorkspace((s) => s.rejection);
  const conditioning = useWorkspace((s) => s.conditioning);
  const eventSelection = useWorkspace((s) => s.eventSelection);
  const decisions = useWorkspace((s) => s.decisions);
  const settingsError = useWorkspace((s) => s.settingsError);
  const subjectCode = useWorkspace((s) => s.subjectCode);
  const store = useWorkspace.getState;
  const library = libraryFor(props.userId);

  const [busy, setBusy] = useState<Busy | null>(null);
  const [problem, setProblem] = useState<{ fileName: string; error: IntakeProblem } | null>(null);
  const [libraryNotice, setLibraryNotice] = useState<string | null>(null);
  const [libraryVersion, setLibraryVersion] = useState(0);
  const [origin, setOrigin] = useState<Origin>('your file');
  const [overviewChannel, setOverviewChannel] = useState('');
  const [selectedEvent, setSelectedEvent] = useState<number | null>(null);
  const lastAttempt = useRef<Attempt | null>(null);

  const refuse = (fileName: string, message: string) =>
    setProblem({ fileName, error: { file: 'recording', message, problem: message, field: null, byteOffset: null, signal: null, row: null, column: null, dimension: null } });

  const open = useCallback(
    async (blob: Blob, fileName: string, kind: RecordingKind, from: Origin, events: { blob: Blob; name: string; pairing?: boolean } | null = null, demoCode?: string) => {
      setBusy({ fileName, phase: 'fingerprint', fraction: 0 });
      setLibraryNotice(null);
      setProblem(null);
      lastAttempt.current = { blob, fileName, kind, from, events, demoCode };
      // Progress arrives on its own message port, so a late report can follow the result: ignore it then.
      let finished = false;
      try {
        const outcome = await openRecording({ blob, fileName, kind, from, events, demoCode, library }, (phase, fraction) => {
          if (!finished) setBusy({ fileName, phase, fraction });
        });
        finished = true;
        if (!outcome.ok) {
          setProblem({ fileName: outcome.fileName, error: outcome.error });
          return;
        }
        setProblem(null);
        setOrigin(from);
        setOverviewChannel(outcome.channels[0] ?? '');
        setSelectedEvent(null);
        setLibraryNotice(outcome.libraryNotice);
        setLibraryVersion((v) => v + 1);
      } catch (error) {
        refuse(fileName, `reading stopped unexpectedly: ${error instanceof Error ? error.message : String(error)}`);
      } finally {
        finished = true;
        setBusy(null);
      }
    },
    [],
  );

  const openEdf = (file: File, events: File | null) => void open(file, file.name, { kind: 'edf' }, 'your file', events ? { blob: events, name: events.name } : null);
  // An events file on its own pairs with the open EDF: the same file is read again with it.
  const pairEvents = (file: File) => {
    const a = lastAttempt.current;
    if (a === null || a.kind.kind !== 'edf' || store().recording === null) {
      return refuse(file.name, 'is an events file: open an EDF/EDF+ recording first (or drop both together), or choose it with a CSV/TSV matrix.');
    }
    void open(a.blob, a.fileName, a.kind, a.from, { blob: file, name: file.name, pairing: true }, a.demoCode);
  };
  const openCsv = (file: File, c: CsvChoice) =>
    void open(file, file.name, { kind: 'csv', sampleRateHz: c.sampleRateHz, delimiter: c.delimiter, events: null }, 'your file', c.events ? { blob: c.events, name: c.events.name } : null);

  const openDemo = async (subject: DemoSubject) => {
    setBusy({ fileName: subject.fileName, phase: 'download', fraction: 0 });
    try {
      const response = await send(`/demo/${encodeURIComponent(subject.fileName)}`);
      if (!response.ok) throw new Error(await errorMessageOf(response));
      const blob = await response.blob();
      await open(blob, subject.fileName, { kind: 'edf' }, 'demo cohort', null, subject.code);
    } catch (error) {
      setBusy(null);
      refuse(subject.fileName, `the demo file could not be fetched: ${error instanceof Error ? error.message : String(error)}`);
    }
  };

  const reopen = async (entry: LibraryEntry) => {
    const found = await library.file(entry.fingerprint);
    if (!found) return refuse(entry.fileName, 'it is no longer in this browser’s library.');
    const kind: RecordingKind =
      entry.kind === 'csv' && entry.csv
        ? { kind: 'csv', sampleRateHz: entry.csv.sampleRateHz, delimiter: entry.csv.delimiter, events: null }
        : { kind: 'edf', ...(entry.edf ?? {}) };
    const eventsName = entry.csv?.eventsFileName ?? entry.edfEventsFileName ?? null;
    const events = found.events && eventsName ? { blob: found.events, name: eventsName } : null;
    await open(found.blob, entry.fileName, kind, 'this browser’s library', events);
  };

  const decideUnit = (decision: UnitDecision) => {
    const attempt = lastAttempt.current;
    if (!attempt || attempt.kind.kind !== 'edf') return;
    void open(attempt.blob, attempt.fileName, withDecision(attempt.kind, decision), attempt.from, attempt.events, attempt.demoCode);
  };
  const attempt = lastAttempt.current;
  const unknownUnit =
    problem && problem.error.file === 'recording' && problem.error.field === 'physical dimension' && problem.error.signal !== null && problem.error.dimension !== null && attempt?.kind.kind === 'edf'
      ? { signal: problem.error.signal, dimension: problem.error.dimension }
      : null;

  return (
    <div className="grid gap-6">
      <div className="grid gap-6 lg:grid-cols-[3fr_2fr]">
        <section className="card grid min-w-0 content-start gap-4" aria-labelledby="source-open">
          <h2 id="source-open" className="text-lg font-semibold">
            Open a recording
          </h2>
          <OpenPanel busy={busy !== null} onOpenEdf={openEdf} onOpenCsv={openCsv} onEvents={pairEvents} onRefuse={(m) => refuse('That file', m)} />
          <hr className="tide-rule" />
          {import.meta.env.TIDEMARK_DEMO && <DemoPicker busy={busy !== null} onPick={(s) => void openDemo(s)} />}
          {busy && <IntakeProgress busy={busy} />}
          {problem && (
            <IntakeProblemNotice fileName={problem.fileName} error={problem.error} onDismiss={() => setProblem(null)}>
              {unknownUnit && <UnitChoice key={`${unknownUnit.signal}|${unknownUnit.dimension}`} {...unknownUnit} busy={busy !== null} onChoose={decideUnit} />}
            </IntakeProblemNotice>
          )}
        </section>
        <section className="card grid min-w-0 content-start gap-3" aria-labelledby="source-library">
          <h2 id="source-library" className="text-lg font-semibold">
            Library on this device
          </h2>
          <LibraryPanel library={library} expiryDays={props.libraryDays} version={libraryVersion} busy={busy !== null} currentFingerprint={fingerprint} onReopen={(e) => void reopen(e)} notice={libraryNotice} />
        </section>
      </div>

      {recording && local && fingerprint ? (
        <>
          <section className="card grid min-w-0 gap-3" aria-labelledby="source-details" data-testid="recording-details">
            <h2 id="source-details" className="text-lg font-semibold">
              The recording <span className="text-sm font-normal text-ink-soft">({formatBytes(local.sizeBytes)})</span>
            </h2>
            <LocalDetails recording={recording} local={local} fingerprint={fingerprint} origin={origin} />
          </section>
          <section className="card grid min-w-0 gap-3" aria-labelledby="source-channels" data-testid="channels-panel">
            <h2 id="source-channels" className="text-lg font-semibold">
              Channels, reference and filters
            </h2>
            <ChannelsPanel
              recording={recording}
              conditioning={conditioning}
              onChange={(p) => store().setConditioning(p)}
              problem={settingsError !== null && /^(signals|reference|filters)/.test(settingsError) ? settingsError : null}
            />
          </section>
          <section className="card grid min-w-0 gap-3" aria-labelledby="source-conditions">
            <h2 id="source-conditions" className="text-lg font-semibold">
              Events to conditions
            </h2>
            {local.eventTable && <EventTablePanel key={`${fingerprint}|${local.eventTable.header.join('\t')}`} header={local.eventTable.header} selection={eventSelection} onApply={(s) => store().setEventSelection(s)} />}
            <ConditionsPanel
              key={fingerprint}
              recording={recording}
              conditions={conditions}
              epochWindow={epochWindow}
              settingsError={settingsError}
              onConditions={(c) => store().setConditions(c)}
              onWindow={(w) => store().setEpochWindow(w)}
            />
          </section>
          <section className="card grid min-w-0 gap-3" aria-labelledby="source-overview">
            <h2 id="source-overview" className="text-lg font-semibold">
              Epochs over the recording
            </h2>
            <OverviewTrace
              recording={recording}
              decisions={decisions}
              epochWindow={epochWindow}
              channel={overviewChannel}
              onChannel={setOverviewChannel}
              selectedEvent={selectedEvent}
            />
          </section>
          {decisions.length > 0 && (
            <section className="card grid min-w-0 gap-3" aria-labelledby="source-rejection">
              <h2 id="source-rejection" className="text-lg font-semibold">
                Epoch rejection
              </h2>
              <RejectionPanel
                recording={recording}
                rejection={rejection}
                conditioning={conditioning}
                decisions={decisions}
                overviewChannel={overviewChannel || recording.channelNames[0]}
                onRejection={(p) => store().setRejection(p)}
                onOverride={(i, d) => store().setOverride(i, d)}
                onSelect={setSelectedEvent}
              />
            </section>
          )}
          <section className="card grid min-w-0 gap-3" aria-labelledby="source-session">
            <h2 id="source-session" className="text-lg font-semibold">
              Analysis session
            </h2>
            <SessionPanel
              studyId={props.study.id}
              fingerprint={fingerprint}
              subjectCode={subjectCode}
              mayCreateSessions={props.mayCreateSessions}
              role={props.role}
              onSubjectCode={(code) => store().set({ subjectCode: code })}
            />
          </section>
        </>
      ) : (
        <p className="text-ink-soft">No recording is open yet. Whatever you open stays on this device.</p>
      )}
    </div>
  );
}
