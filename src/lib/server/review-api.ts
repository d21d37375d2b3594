/**
 * Shared pieces of the review routes (src/pages/api/analysis-sessions/**, src/pages/api/notes/**): the member-scoped
 * loads that answer 404 for another team's rows, and the JSON shapes the routes answer with.
 */
import type { APIContext } from 'astro';
import { getNoteForMember, getRecipeVersion, getSessionForReader, membersAmong, type NoteWithRole, type SessionWithRole } from '../../db/queries/review';
import type { Note, RecipeVersion, Signature } from '../../db/schema';
import { HttpError, notFound, requireUser } from './http';
import { readAsSignedIn } from './request-auth';

/** The route's analysis session and the signed-in reader (401, or 404 for another team's session or none). */
export async function loadSession(ctx: APIContext): Promise<{ user: NonNullable<App.Locals['user']> } & SessionWithRole> {
  const found = (await readAsSignedIn(ctx, (reader) => getSessionForReader(ctx.params.sessionId ?? '', reader))) ?? notFound('The analysis session');
  return { user: requireUser(ctx.locals), ...found };
}

export async function loadNote({ locals, params }: APIContext): Promise<{ user: NonNullable<App.Locals['user']> } & NoteWithRole> {
  const user = requireUser(locals);
  const found = (await getNoteForMember(params.noteId ?? '', user.id)) ?? notFound('The note');
  return { user, ...found };
}

/** A version number from the path, or 404 (a number that is not a version looks like any missing version). */
export async function loadVersion(ctx: SessionWithRole, raw: string | undefined): Promise<RecipeVersion> {
  const n = /^[1-9][0-9]{0,8}$/.test(raw ?? '') ? Number(raw) : NaN;
  if (!Number.isInteger(n)) notFound('That recipe version');
  return (await getRecipeVersion(ctx.session.id, n)) ?? notFound('That recipe version');
}

export function versionJson(v: RecipeVersion) {
  return { number: v.number, recipe: v.recipe, recipeHash: v.recipeHash, createdBy: v.createdBy, createdAt: v.createdAt };
}

export function signatureJson(s: Signature) {
  return {
    id: s.id,
    recipeVersion: s.recipeVersionNumber,
    signerId: s.signerId,
    printedName: s.printedName,
    meaning: s.meaning,
    reason: s.reason,
    contentHash: s.contentHash,
    signedAt: s.signedAt,
  };
}

export function noteJson(n: Note, extra: { authorName?: string; recipeVersion?: number | null } = {}) {
  return {
    id: n.id,
    parentId: n.parentId,
    recipeVersion: extra.recipeVersion ?? null,
    anchor: n.anchor,
    authorId: n.authorId,
    ...(extra.authorName ? { authorName: extra.authorName } : {}),
    body: n.body,
    mentions: n.mentions,
    revision: n.revision,
    resolvedAt: n.resolvedAt,
    resolvedBy: n.resolvedBy,
    createdAt: n.createdAt,
    updatedAt: n.updatedAt,
  };
}

/** The mentioned user ids, once each, when all are members of the team; else 400 naming each stranger's index. */
export async function checkMentions(teamId: string, ids: string[]): Promise<string[]> {
  const unique = [...new Set(ids)];
  const members = new Set((await membersAmong(teamId, unique)).map((m) => m.id));
  const strangers = unique.map((id, i) => ({ id, i })).filter((m) => !members.has(m.id));
  if (strangers.length) {
    throw new HttpError(400, 'invalid', `mentions.${strangers[0].i}: is not a member of this team`, strangers.map((s) => ({ path: `mentions.${s.i}`, message: 'is not a member of this team' })));
  }
  return unique;
}

