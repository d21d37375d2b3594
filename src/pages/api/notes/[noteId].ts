// One note: read it, or edit its text (its author only). `revision` is the revision the edit started from; a stale
// one answers 409 with the current note, and nothing is overwritten.
import type { APIRoute } from 'astro';
import { HttpError, json, parseJson, requirePermission, route } from '../../../lib/server/http';
import { checkMentions, loadNote, noteJson } from '../../../lib/server/review-api';
import { editNote } from '../../../db/queries/review';
import { NOTE_CAPS, NoteEditInput } from '../../../lib/schemas/review';
import { mailMentioned } from '../../../lib/server/review-mail';
import { wakeMailSender } from '../../../lib/server/mail';

export const GET: APIRoute = (ctx) =>
  route(ctx, async () => {
    const found = await loadNote(ctx);
    requirePermission(found.role, 'note:view');
    return json({ note: noteJson(found.note) });
  });

export const PATCH: APIRoute = (ctx) =>
  route(ctx, async ({ request, url }) => {
    const found = await loadNote(ctx);
    requirePermission(found.role, 'note:create');
    if (found.note.authorId !== found.user.id) throw new HttpError(403, 'forbidden', 'Only the author may edit a note; reply to it instead.');
    const input = await parseJson(request, NoteEditInput, { maxBytes: NOTE_CAPS.bodyBytes });
    const mentions = await checkMentions(found.team.id, input.mentions);
    const added = mentions.filter((m) => !found.note.mentions.includes(m));
    const place = { url, team: found.team, study: found.study, session: found.session };
    const result = await editNote(found, found.user.id, input.revision, input.body, mentions, (tx, note) => mailMentioned(tx, place, found.user, note.id, note.body, added));
    if (!result.ok) {
      return json({ error: { code: 'stale_note', message: `The note changed since revision ${input.revision} (it is at revision ${result.current.revision}). Nothing was saved: merge your text into the current note or reload it.` }, current: noteJson(result.current) }, 409);
    }
    if (added.length) wakeMailSender();
    return json({ note: noteJson(result.note) });
  });
