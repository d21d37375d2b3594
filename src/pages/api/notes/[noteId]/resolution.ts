// Resolve a note's thread ({ "resolved": true }) or reopen it ({ "resolved": false }). Only top-level notes are
// resolved; a reply answers 400.
import type { APIRoute } from 'astro';
import { HttpError, json, parseJson, requirePermission, route } from '../../../../lib/server/http';
import { loadNote, noteJson } from '../../../../lib/server/review-api';
import { setNoteResolved } from '../../../../db/queries/review';
import { NoteResolutionInput } from '../../../../lib/schemas/review';

export const PUT: APIRoute = (ctx) =>
  route(ctx, async ({ request }) => {
    const found = await loadNote(ctx);
    requirePermission(found.role, 'note:resolve');
    const input = await parseJson(request, NoteResolutionInput, { maxBytes: 1024 });
    if (found.note.parentId) throw new HttpError(400, 'reply', 'A reply is resolved with its thread: resolve the note it answers.');
    const note = await setNoteResolved(found, found.user.id, input.resolved);
    return json({ note: noteJson(note) });
  });
