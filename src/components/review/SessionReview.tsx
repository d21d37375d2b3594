import { useMemo, useState } from 'react';
import type { Role } from '../../lib/permissions';
import { allowedSteps, STEP_WORDS, whyNoSteps, type ReviewStep } from '../../lib/client/review/actions';
import { postNote, useNotes, useOutbox, useReviewStep, useSessionView, useSummary } from '../../lib/client/review/api';
import { ReviewQueryProvider } from '../../lib/client/review/query';
import { sessionExport } from '../../lib/client/review/session-view';
import type { SessionView } from '../../lib/client/review/types';
import { downloadBlob, fileSafe } from '../explorer/download';
import Manifest from './Manifest';
import NoteThread from './NoteThread';
import OutboxNotices from './OutboxNotices';
import RecipeVersions from './RecipeVersions';
import SignDialog from './SignDialog';
import SummaryOverview from './SummaryOverview';

interface Props {
  sessionId: string;
  study: { id: string; name: string };
  team: { id: string; name: string };
  me: { id: string; name: string };
  role: Role;
  ownerName: string;
  initial: SessionView;
}

function SessionReviewBody({ sessionId, study, team, me, role, ownerName, initial }: Props) {
  const session = useSessionView(sessionId, initial);
  const view = session.data ?? initial;
  const s = view.analysisSession;
  const summary = useSummary(sessionId, s.currentVersion);
  const notes = useNotes(sessionId);
  const outbox = useOutbox(me.id, sessionId);
  const [signing, setSigning] = useState<ReviewStep | null>(null);
  const [noteBody, setNoteBody] = useState('');
  const [onVersion, setOnVersion] = useState(true);
  const submit = useReviewStep(sessionId);
  const check = { role, isOwner: s.ownerId === me.id, status: s.status, currentVersion: s.currentVersion, hasSummary: view.current?.summaryHash != null };
  const steps = allowedSteps(check);
  const threads = useMemo(() => (notes.data ?? []).filter((n) => n.parentId === null), [notes.data]);

  const exportJson = () => {
    const doc = sessionExport({ team, study, view, ownerName, summary: summary.data, notes: notes.data ?? [] });
    downloadBlob(new Blob([JSON.stringify(doc, null, 2)], { type: 'application/json' }), `session-${fileSafe(s.subjectCode)}-v${s.currentVersion ?? 0}.json`);
  };

  return (
    <div className="grid gap-6" data-testid="session-review" data-status={s.status}>
      <section className="card" aria-labelledby="status-h">
        <h2 id="status-h" className="text-lg font-semibold">
          Status: <span className="role-badge" data-testid="session-status">{s.status}</span>
          {s.currentVersion !== null && <span className="text-sm font-normal text-ink-soft"> · recipe version {s.currentVersion}</span>}
        </h2>
        {s.status === 'returned' && s.returnReason && (
          <p className="notice notice-warn mt-2" data-testid="return-reason">
            Returned: {s.returnReason}
          </p>
        )}
        <div className="mt-3 flex flex-wrap gap-2" data-testid="review-steps">
          {steps.map((step) => (
            <button
              key={step}
              type="button"
              className={step === 'signOff' || step === 'submit' ? 'btn btn-primary' : 'btn btn-quiet'}
              disabled={submit.isPending}
              onClick={() => (step === 'submit' ? submit.mutate({ step, recipeVersion: s.currentVersion! }) : setSigning(step))}
            >
              {STEP_WORDS[step]}
            </button>
          ))}
          {steps.length === 0 && whyNoSteps(check) && <p className="text-sm text-ink-soft" data-testid="no-steps">{whyNoSteps(check)}</p>}
          <a className="btn btn-quiet ml-auto" href={`/teams/${team.id}/studies/${study.id}/workspace?session=${sessionId}`} data-testid="open-in-workspace">
            Open in workspace
          </a>
          <button type="button" className="btn btn-quiet" onClick={exportJson} data-testid="export-session">
            Download this session (JSON)
          </button>
        </div>
        {submit.error && (
          <p className="notice notice-warn mt-2" role="alert">
            {submit.error.message}
          </p>
        )}
        {signing && s.currentVersion !== null && <SignDialog step={signing} version={s.currentVersion} me={me} sessionId={sessionId} onClose={() => setSigning(null)} />}
      </section>

      <section aria-labelledby="manifest-h">
        <h2 id="manifest-h" className="text-lg font-semibold">
          Signatures
        </h2>
        <Manifest signatures={view.signatures} currentVersion={s.currentVersion} />
      </section>

      <section aria-labelledby="summary-h">
        <h2 id="summary-h" className="text-lg font-semibold">
          Current summary
        </h2>
        {s.currentVersion === null ? (
          <p className="text-sm text-ink-soft">No recipe version yet.</p>
        ) : summary.isPending ? (
          <p className="text-sm">Loading…</p>
        ) : summary.data ? (
          <SummaryOverview view={summary.data} />
        ) : (
          <p className="text-sm text-ink-soft">Version {s.currentVersion} has no summary yet.</p>
        )}
        <p className="mt-2 text-2xs text-ink-soft">Derived numbers only: the recording stays on the analyst’s device. Research use; not for diagnosis or treatment.</p>
      </section>

      <section aria-labelledby="versions-h">
        <h2 id="versions-h" className="text-lg font-semibold">
          Recipe versions
        </h2>
        <RecipeVersions versions={view.versions} currentVersion={s.currentVersion} />
      </section>

      <section aria-labelledby="notes-h">
        <h2 id="notes-h" className="text-lg font-semibold">
          Notes
        </h2>
        <OutboxNotices items={outbox} userId={me.id} />
        <form
          className="mt-3 grid max-w-2xl gap-2"
          onSubmit={(e) => {
            e.preventDefault();
            const body = noteBody.trim();
            if (body === '') return;
            void postNote(me.id, sessionId, { body, recipeVersion: onVersion ? s.currentVersion : null });
            setNoteBody('');
          }}
        >
          <label className="field">
            <span>New note</span>
            <textarea rows={3} maxLength={4000} value={noteBody} onChange={(e) => setNoteBody(e.target.value)} />
          </label>
          {s.currentVersion !== null && (
            <label className="flex items-center gap-2 text-sm">
              <input type="checkbox" checked={onVersion} onChange={(e) => setOnVersion(e.target.checked)} /> about recipe version {s.currentVersion} (otherwise the session as a whole)
            </label>
          )}
          <div>
            <button type="submit" className="btn btn-primary">
              Post note
            </button>
          </div>
        </form>
        {notes.error && <p className="notice notice-warn mt-2">{notes.error.message}</p>}
        {threads.length === 0 ? (
          <p className="mt-3 text-sm text-ink-soft">No notes yet.</p>
        ) : (
          <ul className="mt-3 grid gap-3" data-testid="note-list">
            {threads.map((t) => (
              <NoteThread key={t.id} note={t} replies={(notes.data ?? []).filter((r) => r.parentId === t.id)} userId={me.id} sessionId={sessionId} currentVersion={s.currentVersion} />
            ))}
          </ul>
        )}
      </section>
    </div>
  );
}

export default function SessionReview(props: Props) {
  return (
    <ReviewQueryProvider>
      <SessionReviewBody {...props} />
    </ReviewQueryProvider>
  );
}
