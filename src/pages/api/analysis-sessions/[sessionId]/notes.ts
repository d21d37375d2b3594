// Notes of a session: list them (threads: replies carry parentId), or post a new one — on a recipe version with an
// optional anchor (channel or channel group, condition, time and frequency range), or on the session as a whole.
// Mentions must name members of the team; each mentioned person gets a mail unless muted.
import type { APIRoute } from 'astro';
import { HttpError, json, parseJson, requirePermission, route } from '../../../../lib/server/http';
import { checkMentions, loadSession, noteJson } from '../../../../lib/server/review-api';
import { createNote, createNoteAsSignedIn, getRecipeVersion, listNotes } from '../../../../db/queries/review';
import { adoptSignIn, deferredSignIn } from '../../../../lib/server/request-auth';
import { can, roles } from '../../../../lib/permissions';
import { NOTE_CAPS, NoteInput } from '../../../../lib/schemas/review';
import { mailMentioned } from '../../../../lib/server/review-mail';
import { wakeMailSender } from '../../../../lib/server/mail';

export const GET: APIRoute = (ctx) =>
  route(ctx, async () => {
    const found = await loadSession(ctx);
    requirePermission(found.role, 'note:view');
    const rows = await listNotes(found.session.id);
    return json({ notes: rows.map((r) => noteJson(r.note, { authorName: r.authorName, recipeVersion: r.recipeVersion })) });
  });

// Roles that may post a note (the permission matrix), for the statement that checks and stores at once.
const POSTERS = roles.filter((r) => can(r, 'note:create'));

export const POST: APIRoute = (ctx) =>
  route(ctx, async ({ request, url }) => {
    // The body is read first, but a refusal of it waits until the sign-in and the session have been checked.
    const read = await parseJson(request, NoteInput, { maxBytes: NOTE_CAPS.bodyBytes }).then(
      (value) => ({ ok: true as const, value }),
      (error: unknown) => ({ ok: false as const, error }),
    );
    // The busiest write: a plain note (no mentions) is checked and stored in one round trip when the statement can
    // vouch for the sign-in (createNoteAsSignedIn); anything else takes the ordinary path below.
    const deferred = deferredSignIn(ctx);
    if (read.ok && deferred !== null && read.value.mentions.length === 0) {
      const input = read.value;
      const made = await createNoteAsSignedIn(ctx.params.sessionId ?? '', deferred, POSTERS, { body: input.body, recipeVersion: input.recipeVersion, anchor: input.anchor, clientKey: input.clientKey });
      if (made) {
        adoptSignIn(ctx, made.signIn);
        return json({ note: noteJson(made.note, { authorName: made.signIn.display_name, recipeVersion: input.recipeVersion }) }, 201);
      }
    }
    const found = await loadSession(ctx);
    requirePermission(found.role, 'note:create');
    if (!read.ok) throw read.error;
    const input = read.value;
    let recipeVersionId: string | null = null;
    if (input.recipeVersion !== null) {
      const version = await getRecipeVersion(found.session.id, input.recipeVersion);
      if (!version) throw new HttpError(400, 'invalid', `recipeVersion: this session has no version ${input.recipeVersion}`, [{ path: 'recipeVersion', message: `this session has no version ${input.recipeVersion}` }]);
      recipeVersionId = version.id;
    }
    const mentions = await checkMentions(found.team.id, input.mentions);
    const place = { url, team: found.team, study: found.study, session: found.session };
    // The mention mail is queued in the note's own transaction: stored with the note, or not at all. A note without
    // mentions is stored in one message to PostgreSQL (createNote).
    const result = await createNote(found, found.user.id, { body: input.body, recipeVersionId, anchor: input.anchor, mentions, parentId: null, clientKey: input.clientKey },
      mentions.length ? (tx, note) => mailMentioned(tx, place, found.user, note.id, note.body, mentions) : undefined);
    if (!result.ok) throw new HttpError(409, 'client_key_reused', 'clientKey: you used this key for another post. Nothing was stored.');
    const body = { note: noteJson(result.note, { authorName: found.user.displayName, recipeVersion: input.recipeVersion }) };
    // A post sent again (same clientKey) answers 200 with the stored note; it was audited and mailed the first time.
    if (result.replayed) return json(body, 200);
    if (mentions.length) wakeMailSender();
    return json(body, 201);
  });
