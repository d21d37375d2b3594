import { useState } from 'react';
import { postReply, useResolveNote } from '../../lib/client/review/api';
import type { NoteView } from '../../lib/client/review/types';
import { when } from './when';

export default function NoteThread({ note, replies, userId, sessionId, currentVersion }: { note: NoteView; replies: NoteView[]; userId: string; sessionId: string; currentVersion: number | null }) {
  const [reply, setReply] = useState('');
  const resolve = useResolveNote(sessionId);
  const anchor = note.anchor;
  const where = [
    note.recipeVersion === null ? 'on the session' : `on version ${note.recipeVersion}${note.recipeVersion !== currentVersion ? ' (earlier version)' : ''}`,
    anchor?.channel && `channel ${anchor.channel}`,
    anchor?.channelGroup && `group ${anchor.channelGroup}`,
    anchor?.condition && `condition ${anchor.condition}`,
    anchor?.timeS && `${anchor.timeS[0]}…${anchor.timeS[1]} s`,
    anchor?.frequencyHz && `${anchor.frequencyHz[0]}…${anchor.frequencyHz[1]} Hz`,
  ].filter(Boolean);
  return (
    <li id={`note-${note.id}`} className="border-l-2 border-shell pl-3" data-testid="note" data-resolved={note.resolvedAt ? 'yes' : 'no'}>
      <p className="text-xs text-ink-soft">
        {note.authorName ?? 'someone'} · {when(note.createdAt)} · {where.join(', ')}
        {note.resolvedAt && ' · resolved'}
      </p>
      <p className="whitespace-pre-wrap">{note.body}</p>
      <ul className="mt-1 grid gap-1 pl-4">
        {replies.map((r) => (
          <li key={r.id} className="text-sm">
            <span className="text-xs text-ink-soft">
              {r.authorName ?? 'someone'} · {when(r.createdAt)}:
            </span>{' '}
            <span className="whitespace-pre-wrap">{r.body}</span>
          </li>
        ))}
      </ul>
      <form
        className="mt-1 flex flex-wrap items-center gap-2"
        onSubmit={(e) => {
          e.preventDefault();
          if (reply.trim() === '') return;
          void postReply(userId, sessionId, note.id, reply.trim());
          setReply('');
        }}
      >
        <input className="min-w-64 rounded border border-shell bg-foam px-2 py-1 text-sm" aria-label={`Reply to the note by ${note.authorName ?? 'someone'}`} value={reply} onChange={(e) => setReply(e.target.value)} placeholder="Reply" maxLength={4000} />
        <button type="submit" className="btn btn-quiet text-sm">
          Reply
        </button>
        <button type="button" className="btn btn-quiet text-sm" disabled={resolve.isPending} onClick={() => resolve.mutate({ noteId: note.id, resolved: note.resolvedAt === null })}>
          {note.resolvedAt ? 'Reopen' : 'Mark resolved'}
        </button>
        {resolve.error && <span className="text-sm text-coral-deep">{resolve.error.message}</span>}
      </form>
    </li>
  );
}
