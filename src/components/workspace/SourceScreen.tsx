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
import { formatBytes, formatSeconds } from '../source/format';
import SourceStep, { SOURCE_STEPS, type SourceStepId } from '../source/SourceStep';
import SourceSteps from '../source/SourceSteps';
import type { Recording } from '../../lib/analysis/recording';
import type { ConditioningSettings, Condition, EpochDecision, LocalRecordingInfo } from '../../lib/client/workspace/source-rules';
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

const STEP_TITLES: Record<SourceStepId, string> = {
  recording: 'The recording',
  channels: 'Channels, reference and filters',
  events: 'Events to conditions',
  epochs: 'Epochs over the recording',
  session: 'Analysis session',
};

function defaultFolds(recording: Recording | null): ReadonlySet<SourceStepId> {
  const types = recording?.channelTypes;
  return new Set<SourceStepId>(types !== undefined && types.length > 0 && new Set(types).size === 1 ? ['channels'] : []);
}

/** One line per step of where it stands, for the step strip and each step's title line. */
function sourceDigests(
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

export default function SourceScreen(props: WorkspaceProps) {
  const recording = useWorkspace((s) => s.recording);
  const local = useWorkspace((s) => s.local);
  const fingerprint = useWorkspace((s) => s.fingerprint);
  // Which opening is shown: a large file's fingerprint arrives after it is on screen, so panels key on this.
  const opening = useWorkspace((s) => s.openCount);
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
  // Which steps are folded, for the recording that is open. A new recording starts from the defaults: Channels is
  // folded when every channel has one type as read from the file (nothing to sort out), open otherwise; a problem
  // with channels, reference or filters always opens it.
  const [foldedBy, setFoldedBy] = useState<{ opening: number; steps: ReadonlySet<SourceStepId> }>({ opening: -1, steps: new Set() });
  const channelProblem = settingsError !== null && /^(signals|reference|filters)/.test(settingsError) ? settingsError : null;
  const chosenFolds = foldedBy.opening === opening ? foldedBy.steps : defaultFolds(recording);
  const folded: ReadonlySet<SourceStepId> = channelProblem === null ? chosenFolds : new Set([...chosenFolds].filter((s) => s !== 'channels'));
  const setFolded = (steps: ReadonlySet<SourceStepId>) => setFoldedBy({ opening, steps });
  const fold = (step: SourceStepId, folding: boolean) => {
    const next = new Set(folded);
    if (folding) next.add(step);
    else next.delete(step);
    setFolded(next);
  };
  const goTo = (step: SourceStepId) => {
    fold(step, false);
    requestAnimationFrame(() => document.getElementById(`step-${step}`)?.scrollIntoView({ block: 'start' }));
  };
  const digests: Partial<Record<SourceStepId, string>> = recording && local ? sourceDigests(recording, local, conditioning, conditions, decisions, epochWindow, props.mayCreateSessions) : {};

  const refuse = (fileName: string, message: string) =>
    setProblem({ fileName, error: { file: 'recording', message, problem: message, field: null, byteOffset: null, signal: null, row: null, column: null, dimension: null } });

  const open = useCallback(
    async (blob: Blob, fileName: string, kind: RecordingKind, from: Origin, events: { blob: Blob; name: string; pairing?: boolean } | null = null, demoCode?: string) => {
      setBusy({ fileName, phase: 'reading', fraction: 0 });
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
        // A large file is kept once its fingerprint is known, after it is already on screen.
        void outcome.kept.then((notice) => {
          if (notice !== null) setLibraryNotice(notice);
          setLibraryVersion((v) => v + 1);
        });
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
          {import.meta.env.TIDEMARK_DEMO && props.offersDemoCohort !== false && <DemoPicker busy={busy !== null} onPick={(s) => void openDemo(s)} />}
          {import.meta.env.TIDEMARK_DEMO && props.offersDemoCohort === false && (
            <p className="text-sm text-ink-soft" data-testid="no-demo-data">
              This study has no demo recordings: the demo cohort belongs to another study. Open a recording of your own.
            </p>
          )}
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

      {recording && local ? (
        <>
          <SourceSteps titles={STEP_TITLES} digests={digests} folded={folded} onGo={goTo} onFoldAll={(fold) => setFolded(new Set(fold ? SOURCE_STEPS : []))} />
          <div className="grid items-start gap-6 lg:grid-cols-2">
            <div className="grid min-w-0 gap-6">
              <SourceStep step="recording" title={STEP_TITLES.recording} digest={digests.recording} open={!folded.has('recording')} onToggle={(o) => fold('recording', !o)} testId="recording-details">
                <LocalDetails recording={recording} local={local} fingerprint={fingerprint} origin={origin} />
              </SourceStep>
              <SourceStep step="channels" title={STEP_TITLES.channels} digest={digests.channels} open={!folded.has('channels')} onToggle={(o) => fold('channels', !o)} testId="channels-panel">
                <ChannelsPanel
                  recording={recording}
                  conditioning={conditioning}
                  onChange={(p) => store().setConditioning(p)}
                  problem={channelProblem}
                />
              </SourceStep>
            </div>
            <SourceStep step="events" title={STEP_TITLES.events} digest={digests.events} open={!folded.has('events')} onToggle={(o) => fold('events', !o)}>
              {local.eventTable && <EventTablePanel key={`${opening}|${local.eventTable.header.join('\t')}`} header={local.eventTable.header} selection={eventSelection} onApply={(s) => store().setEventSelection(s)} />}
              <ConditionsPanel
                key={opening}
                recording={recording}
                conditions={conditions}
                epochWindow={epochWindow}
                settingsError={settingsError}
                onConditions={(c) => store().setConditions(c)}
                onWindow={(w) => store().setEpochWindow(w)}
              />
            </SourceStep>
          </div>
          <SourceStep step="epochs" title={STEP_TITLES.epochs} digest={digests.epochs} open={!folded.has('epochs')} onToggle={(o) => fold('epochs', !o)}>
            <OverviewTrace
              recording={recording}
              decisions={decisions}
              epochWindow={epochWindow}
              channel={overviewChannel}
              onChannel={setOverviewChannel}
              selectedEvent={selectedEvent}
            />
            {decisions.length > 0 && (
              <div className="grid min-w-0 gap-3 border-t border-sand-deep pt-3" data-testid="rejection-block">
                <h3 className="font-semibold">Epoch rejection</h3>
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
              </div>
            )}
          </SourceStep>
          <SourceStep step="session" title={STEP_TITLES.session} digest={digests.session} open={!folded.has('session')} onToggle={(o) => fold('session', !o)}>
            <SessionPanel
              teamId={props.team.id}
              studyId={props.study.id}
              subjectCode={subjectCode}
              mayCreateSessions={props.mayCreateSessions}
              role={props.role}
              onSubjectCode={(code) => store().set({ subjectCode: code })}
            />
          </SourceStep>
        </>
      ) : (
        <p className="text-ink-soft">No recording is open yet. Whatever you open stays on this device.</p>
      )}
    </div>
  );
}
