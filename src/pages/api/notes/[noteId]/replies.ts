// A reply in a note's thread. Replies hang off the top-level note (a reply to a reply joins the same thread) and
// carry no anchor of their own.
import type { APIRoute } from 'astro';
import { HttpError, json, parseJson, requirePermission, route } from '../../../../lib/server/http';
import { checkMentions, loadNote, noteJson } from '../../../../lib/server/review-api';
import { createNote } from '../../../../db/queries/review';
import { NOTE_CAPS, NoteReplyInput } from '../../../../lib/schemas/review';
import { mailMentioned } from '../../../../lib/server/review-mail';
import { wakeMailSender } from '../../../../lib/server/mail';

export const POST: APIRoute = (ctx) =>
  route(ctx, async ({ request, url }) => {
    const found = await loadNote(ctx);
    requirePermission(found.role, 'note:create');
    const input = await parseJson(request, NoteReplyInput, { maxBytes: NOTE_CAPS.bodyBytes });
    const mentions = await checkMentions(found.team.id, input.mentions);
    const parentId = found.note.parentId ?? found.note.id;
    const place = { url, team: found.team, study: found.study, session: found.session };
    const result = await createNote(found, found.user.id, { body: input.body, recipeVersionId: null, anchor: null, mentions, parentId, clientKey: input.clientKey },
      mentions.length ? (tx, note) => mailMentioned(tx, place, found.user, note.id, note.body, mentions) : undefined);
    if (!result.ok) throw new HttpError(409, 'client_key_reused', 'clientKey: you used this key for another post. Nothing was stored.');
    const body = { note: noteJson(result.note, { authorName: found.user.displayName }) };
    if (result.replayed) return json(body, 200);
    if (mentions.length) wakeMailSender();
    return json(body, 201);
  });
