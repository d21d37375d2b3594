import { useEffect } from 'react';
import type { WorkspaceProps } from '../workspace/types';
import { bindReview, linkAnalysisSession, mayEditSession, openSessionRecordingFromLibrary, saveAsVersion, setAutosave, takeCurrentVersion, unlinkAnalysisSession, useReviewLink } from '../../lib/client/workspace/review';

/**
 * The workspace's line about its analysis session (shown once one is linked: started on the Source screen, or
 * opened from the session's page with `?session=<id>`): status and version, whether the open recording is the
 * session's, "Save as version" with autosave, and the way back to the session's page.
 */
export default function SessionBar({ userId, team, study }: Pick<WorkspaceProps, 'userId' | 'team' | 'study'>) {
  const session = useReviewLink((s) => s.session);
  const loading = useReviewLink((s) => s.loading);
  const problem = useReviewLink((s) => s.problem);
  const match = useReviewLink((s) => s.match);
  const saving = useReviewLink((s) => s.saving);
  const autosave = useReviewLink((s) => s.autosave);
  const mayEdit = useReviewLink(mayEditSession);

  useEffect(() => {
    bindReview(userId);
    const id = new URLSearchParams(window.location.search).get('session');
    if (id !== null && /^[0-9a-f-]{8,64}$/i.test(id)) void linkAnalysisSession(id);
  }, [userId]);

  if (session === null) {
    if (loading) return <p className="mt-2 text-sm text-ink-soft" role="status">Opening the analysis session…</p>;
    return problem ? (
      <p className="notice notice-warn mt-2 text-sm" role="alert" data-testid="session-bar-problem">
        {problem}
      </p>
    ) : null;
  }
  const page = `/teams/${team.id}/studies/${study.id}/sessions/${session.id}`;
  const busy = saving.state === 'saving' || match.phase === 'applying';
  const warn = match.phase === 'mismatch' || match.phase === 'failed';
  return (
    <section className="card mt-2 grid gap-2 p-3" aria-label="Analysis session" data-testid="session-bar" data-phase={match.phase} data-status={session.status}>
      <div className="flex flex-wrap items-center gap-3">
        <p className="font-semibold">
          Analysis session <span className="font-mono">{session.subjectCode}</span> · <span className="role-badge" data-testid="session-bar-status">{session.status}</span>
          <span className="text-sm font-normal text-ink-soft">
            {' '}
            · {session.currentVersion === null ? 'no version saved yet' : `recipe version ${session.currentVersion}`}
            {session.fingerprint && (
              <>
                {' '}
                · recording <span className="font-mono text-2xs">{session.fingerprint.slice(0, 12)}…</span>
              </>
            )}
          </span>
        </p>
        <a className="text-sm" href={page} data-testid="session-bar-page">
          The session’s page (review, signing)
        </a>
        <button type="button" className="btn btn-quiet ml-auto text-sm" onClick={() => unlinkAnalysisSession()}>
          Leave the session
        </button>
      </div>
      {session.status === 'returned' && session.returnReason && (
        <p className="notice notice-warn text-sm" data-testid="session-bar-returned">
          Returned: {session.returnReason}
        </p>
      )}
      {match.message && (
        <p className={warn ? 'notice notice-warn text-sm' : 'text-sm text-ink-soft'} role={warn ? 'alert' : 'status'} data-testid="session-bar-match">
          {match.message}
        </p>
      )}
      {match.phase === 'needs-file' && match.libraryEntry && (
        <div>
          <button type="button" className="btn btn-primary text-sm" onClick={() => void openSessionRecordingFromLibrary()} data-testid="session-bar-library">
            Open {match.libraryEntry.fileName} from this browser’s library
          </button>
        </div>
      )}
      {mayEdit && (match.phase === 'ready' || match.phase === 'failed') && (
        <div className="flex flex-wrap items-center gap-3">
          <button type="button" className="btn btn-primary text-sm" disabled={busy} onClick={() => void saveAsVersion()} data-testid="save-version">
            {saving.state === 'saving' ? 'Saving…' : 'Save as version'}
          </button>
          <label className="flex items-center gap-1 text-sm" title="After a few quiet seconds, a changed recipe is kept as a new version (sent once; it waits in this browser while the server cannot be reached)">
            <input type="checkbox" checked={autosave.enabled} onChange={(e) => setAutosave(e.target.checked)} data-testid="autosave" />
            autosave recipe edits as versions
          </label>
          {autosave.message && (
            <span className="text-xs text-ink-soft" data-testid="autosave-state" data-state={autosave.state}>
              {autosave.message}
            </span>
          )}
        </div>
      )}
      {saving.message && (
        <p className={saving.state === 'failed' ? 'notice notice-warn text-sm' : 'text-sm'} role={saving.state === 'failed' ? 'alert' : 'status'} data-testid="save-version-state" data-state={saving.state}>
          {saving.message}
        </p>
      )}
      {saving.state === 'failed' && saving.stale && (
        <div className="flex flex-wrap gap-2">
          <button type="button" className="btn btn-quiet text-sm" onClick={() => void saveAsVersion()}>
            Keep mine: save it over version {session.currentVersion}
          </button>
          <button type="button" className="btn btn-quiet text-sm" onClick={() => void takeCurrentVersion()}>
            Take version {session.currentVersion} instead
          </button>
        </div>
      )}
      {!mayEdit && session.status !== 'in review' && <p className="text-xs text-ink-soft">You read this session and pin notes; its owner saves versions.</p>}
      <p className="text-2xs text-ink-soft">Only the recipe, the summary’s derived numbers and notes go to the server; the recording stays on this device. Research use; not for diagnosis or treatment.</p>
    </section>
  );
}
