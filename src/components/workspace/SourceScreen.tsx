import { useState } from 'react';
import type { WorkspaceProps } from './types';
import { libraryFor } from '../../lib/client/library';
import { useSourceIntake } from '../../lib/client/workspace/source-intake';
import OpenPanel, { type CsvChoice } from '../source/OpenPanel';
import DemoPicker from '../source/DemoPicker';
import LibraryPanel from '../source/LibraryPanel';
import LocalDetails from '../source/LocalDetails';
import ChannelsPanel from '../source/ChannelsPanel';
import ConditionsPanel from '../source/ConditionsPanel';
import EventTablePanel from '../source/EventTablePanel';
import OverviewTrace from '../source/OverviewTrace';
import RejectionPanel from '../source/RejectionPanel';
import SessionPanel from '../source/SessionPanel';
import UnitChoice, { withDecision } from '../source/UnitChoice';
import IntakeProgress from '../source/IntakeProgress';
import IntakeProblemNotice from '../source/IntakeProblemNotice';
import SourceStep, { SOURCE_STEPS, type SourceStepId } from '../source/SourceStep';
import SourceSteps from '../source/SourceSteps';
import { STEP_TITLES, defaultFolds, sourceDigests } from '../source/step-digests';
import { useWorkspace } from '../../lib/client/workspace/store';

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

  const intake = useSourceIntake(library);
  const { busy, problem, origin, overviewChannel, setOverviewChannel, selectedEvent, setSelectedEvent, open, refuse, unknownUnit } = intake;

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

  const openEdf = (file: File, events: File | null) => void open(file, file.name, { kind: 'edf' }, 'your file', events ? { blob: events, name: events.name } : null);
  const openCsv = (file: File, c: CsvChoice) =>
    void open(file, file.name, { kind: 'csv', sampleRateHz: c.sampleRateHz, delimiter: c.delimiter, events: null }, 'your file', c.events ? { blob: c.events, name: c.events.name } : null);

  return (
    <div className="grid gap-6">
      <div className="grid gap-6 lg:grid-cols-[3fr_2fr]">
        <section className="card grid min-w-0 content-start gap-4" aria-labelledby="source-open">
          <h2 id="source-open" className="text-lg font-semibold">
            Open a recording
          </h2>
          <OpenPanel busy={busy !== null} onOpenEdf={openEdf} onOpenCsv={openCsv} onEvents={intake.pairEvents} onRefuse={(m) => refuse('That file', m)} />
          <hr className="tide-rule" />
          {import.meta.env.TIDEMARK_DEMO && props.offersDemoCohort !== false && <DemoPicker busy={busy !== null} onPick={(s) => void intake.openDemo(s)} />}
          {import.meta.env.TIDEMARK_DEMO && props.offersDemoCohort === false && (
            <p className="text-sm text-ink-soft" data-testid="no-demo-data">
              This study has no demo recordings: the demo cohort belongs to another study. Open a recording of your own.
            </p>
          )}
          {busy && <IntakeProgress busy={busy} />}
          {problem && (
            <IntakeProblemNotice fileName={problem.fileName} error={problem.error} onDismiss={intake.dismissProblem}>
              {unknownUnit && <UnitChoice key={`${unknownUnit.signal}|${unknownUnit.dimension}`} {...unknownUnit} busy={busy !== null} onChoose={(decision) => intake.reopenEdfWith((kind) => withDecision(kind, decision))} />}
            </IntakeProblemNotice>
          )}
        </section>
        <section className="card grid min-w-0 content-start gap-3" aria-labelledby="source-library">
          <h2 id="source-library" className="text-lg font-semibold">
            Library on this device
          </h2>
          <LibraryPanel library={library} expiryDays={props.libraryDays} version={intake.libraryVersion} busy={busy !== null} currentFingerprint={fingerprint} onReopen={(e) => void intake.reopen(e)} notice={intake.libraryNotice} />
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
