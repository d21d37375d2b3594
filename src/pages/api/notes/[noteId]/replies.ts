// A reply in a note's thread. Replies hang off the top-level note (a reply to a reply joins the same thread) and
// carry no anchor of their own.
import type { APIRoute } from 'astro';
import { json, parseJson, requirePermission, route } from '../../../../lib/server/http';
import { checkMentions, loadNote, noteJson } from '../../../../lib/server/review-api';
import { createNote } from '../../../../db/queries/review';
import { NOTE_CAPS, NoteReplyInput } from '../../../../lib/schemas/review';
import { mailMentioned } from '../../../../lib/server/review-mail';

export const POST: APIRoute = (ctx) =>
  route(ctx, async ({ request, url }) => {
    const found = await loadNote(ctx);
    requirePermission(found.role, 'note:create');
    const input = await parseJson(request, NoteReplyInput, { maxBytes: NOTE_CAPS.bodyBytes });
    const mentions = await checkMentions(found.team.id, input.mentions);
    const parentId = found.note.parentId ?? found.note.id;
    const reply = await createNote(found, found.user.id, { body: input.body, recipeVersionId: null, anchor: null, mentions, parentId });
    await mailMentioned({ url, team: found.team, study: found.study, session: found.session }, found.user, reply.id, reply.body, mentions);
    return json({ note: noteJson(reply, { authorName: found.user.displayName }) }, 201);
  });
