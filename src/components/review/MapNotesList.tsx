import { useId, useState, useSyncExternalStore } from 'react';
import { describeAnchor, versionStanding } from '../../lib/client/workspace/note-pins';
import { cancelPin, chooseNote, postPinnedNote, setPinMode, useReviewLink } from '../../lib/client/workspace/review';
import { reviewOutbox, type OutboxItem } from '../../lib/client/review/outbox';
import { useWorkspace } from '../../lib/client/workspace/store';

const NO_ITEMS: OutboxItem[] = [];

function useSessionOutbox(userId: string | null, sessionId: string | null): OutboxItem[] {
  const box = userId === null ? null : reviewOutbox(userId);
  const items = useSyncExternalStore(
    (l) => (box === null ? () => undefined : box.subscribe(l)),
    () => box?.list() ?? NO_ITEMS,
    () => NO_ITEMS,
  );
  return items.filter((i) => i.sessionId === sessionId && i.kind === 'note');
}

/**
 * The linked session's notes beside the maps: "Pin a note" (then drag a rectangle or click a point on a map), the
 * form for the drawn region, and every note as a button that moves the maps to its channel and condition and
 * highlights its region. Notes written on an older recipe version say so; their pins show where they pointed.
 */
export default function MapNotesList() {
  const session = useReviewLink((s) => s.session);
  const userId = useReviewLink((s) => s.userId);
  const phase = useReviewLink((s) => s.match.phase);
  const notes = useReviewLink((s) => s.notes);
  const selectedId = useReviewLink((s) => s.selectedNoteId);
  const pending = useReviewLink((s) => s.pending);
  const pinMode = useReviewLink((s) => s.pinMode);
  const compareTo = useWorkspace((s) => s.compareTo);
  const channel = useWorkspace((s) => s.channel);
  const condition = useWorkspace((s) => s.condition);
  const waiting = useSessionOutbox(userId, session?.id ?? null);
  const [body, setBody] = useState('');
  const [problem, setProblem] = useState<string | null>(null);
  const id = useId();
  if (session === null || (phase !== 'ready' && phase !== 'failed')) return null;

  const threads = notes.filter((n) => n.parentId === null);
  const pinned = threads.filter((n) => n.anchor);
  const loose = threads.filter((n) => !n.anchor);
  const current = session.currentVersion;
  const replies = (noteId: string) => notes.filter((n) => n.parentId === noteId).length;

  return (
    <section className="card grid gap-3 p-3" aria-labelledby={`${id}-h`} data-testid="map-notes">
      <div className="flex flex-wrap items-center gap-3">
        <h3 id={`${id}-h`} className="font-semibold">
          Notes of <span className="font-mono">{session.subjectCode}</span>
          {current !== null && <span className="font-normal text-ink-soft"> · maps of recipe version {current}</span>}
        </h3>
        <button
          type="button"
          className={pinMode ? 'btn btn-primary text-sm' : 'btn btn-quiet text-sm'}
          aria-pressed={pinMode}
          disabled={current === null}
          onClick={() => {
            setProblem(null);
            setPinMode(!pinMode);
          }}
          data-testid="pin-mode"
        >
          {pinMode ? 'Stop pinning' : 'Pin a note'}
        </button>
        {current === null && <span className="text-sm text-ink-soft">Save a recipe version first: a note on the maps points into a version.</span>}
        {pinMode && pending === null && (
          <span className="text-sm text-ink-soft" role="status">
            {compareTo !== null ? 'Pins go on one condition’s map: show a condition alone (no difference) to pin a note.' : `Drag a rectangle on a map of ${channel ?? '—'} · ${condition ?? '—'}, or click one cell.`}
          </span>
        )}
      </div>

      {pending !== null && (
        <form
          className="grid gap-2 rounded-sm border border-kelp bg-kelp-pale/40 p-2"
          onSubmit={async (e) => {
            e.preventDefault();
            const p = await postPinnedNote(body);
            setProblem(p);
            if (p === null) setBody('');
          }}
          data-testid="pin-form"
        >
          <label className="field">
            <span>
              Note at <span className="font-mono text-xs">{describeAnchor(pending)}</span> (version {current})
            </span>
            <textarea rows={3} maxLength={4000} value={body} onChange={(e) => setBody(e.target.value)} autoFocus />
          </label>
          <div className="flex gap-2">
            <button type="submit" className="btn btn-primary text-sm">
              Post the note
            </button>
            <button type="button" className="btn btn-quiet text-sm" onClick={() => cancelPin()}>
              Cancel
            </button>
          </div>
        </form>
      )}
      {problem && (
        <p className="notice notice-warn text-sm" role="alert">
          {problem}
        </p>
      )}
      {waiting.length > 0 && (
        <p className="notice notice-warn text-sm" role="status" data-testid="map-notes-waiting">
          {waiting.length === 1 ? '1 note waits' : `${waiting.length} notes wait`} in this browser to be sent. {waiting.find((w) => w.problem)?.problem ?? 'Sending…'}
        </p>
      )}

      {pinned.length === 0 ? (
        <p className="text-sm text-ink-soft">No notes pinned to the maps yet.</p>
      ) : (
        <ol className="grid gap-1" data-testid="map-note-list">
          {pinned.map((n, i) => {
            const standing = versionStanding(n, current);
            const here = n.anchor!.channel === channel && (n.anchor!.condition ?? condition) === condition;
            return (
              <li key={n.id}>
                <button
                  type="button"
                  className={`w-full rounded-sm border px-2 py-1 text-left text-sm ${n.id === selectedId ? 'border-ink bg-sand-deep' : 'border-shell bg-foam hover:bg-sand'}`}
                  aria-pressed={n.id === selectedId}
                  aria-describedby={standing === 'older' ? `${id}-older-${n.id}` : undefined}
                  onClick={() => chooseNote(n.id === selectedId ? null : n.id)}
                  data-testid="map-note"
                  data-note={n.id}
                  data-older={standing === 'older' ? 'yes' : 'no'}
                >
                  <span className="font-mono text-xs">{i + 1}</span> <span className="font-mono text-xs">{describeAnchor(n.anchor)}</span>
                  {!here && <span className="text-xs text-ink-soft"> (another map)</span>}
                  <span className="block whitespace-pre-wrap">{n.body}</span>
                  <span className="block text-xs text-ink-soft">
                    {n.authorName ?? 'someone'} · {n.createdAt.slice(0, 16).replace('T', ' ')} UTC{replies(n.id) > 0 ? ` · ${replies(n.id)} repl${replies(n.id) === 1 ? 'y' : 'ies'}` : ''}
                    {n.resolvedAt ? ' · resolved' : ''}
                  </span>
                  {standing === 'older' && (
                    <span id={`${id}-older-${n.id}`} className="block text-xs text-coral-deep">
                      Written on version {n.recipeVersion}; the maps show version {current}. The dashed pin shows where it pointed then.
                    </span>
                  )}
                </button>
              </li>
            );
          })}
        </ol>
      )}
      {loose.length > 0 && (
        <details className="text-sm">
          <summary>
            {loose.length} note{loose.length === 1 ? '' : 's'} on the session as a whole
          </summary>
          <ul className="mt-1 grid gap-1 pl-4">
            {loose.map((n) => (
              <li key={n.id} className="whitespace-pre-wrap">
                <span className="text-xs text-ink-soft">{n.authorName ?? 'someone'}:</span> {n.body}
              </li>
            ))}
          </ul>
        </details>
      )}
      <p className="text-2xs text-ink-soft">Replies, resolving and signing are on the session’s page. Research use only; not for diagnosis or treatment.</p>
    </section>
  );
}
