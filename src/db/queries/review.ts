/**
 * Team review queries (issue 11): member-scoped loads (another team's rows read as none), recipe versions with
 * optimistic concurrency, summaries, status changes in order, signatures, notes. Each change and its audit event are
 * one transaction; changes to one analysis session are serialized by locking its row (SELECT … FOR UPDATE).
 */
import { and, asc, desc, eq, inArray, isNull, sql } from 'drizzle-orm';
import { createHash, randomUUID } from 'node:crypto';
import pg from 'pg';
import { db, pool } from '../client';
import {
  analysisSessions,
  auditEvents,
  mailMutes,
  memberships,
  notes,
  recipeVersions,
  signatures,
  studies,
  subjects,
  summaries,
  teams,
  users,
  type AnalysisSession,
  type Note,
  type RecipeVersion,
  type Signature,
  type Study,
  type Team,
} from '../schema';
import type { Role } from '../../lib/permissions';
import type { MailKind, NoteAnchorT } from '../../lib/schemas/review';
import { jsonHash, signedContentHash } from '../../lib/crypto/review-hash';
import { appendStatements, literal, recordAudit, recordAuditAndCommit, SqlValue, type AuditInput } from './audit';
import { digestNewSummaries } from './cohort';
import { isUuid } from './teams';
import { columnsOf, perReader, plainSignIn, readerSql, rowOf, splitSignIn, type PlainSignInRow, type Reader } from './readers';

type Tx = Parameters<Parameters<typeof db.transaction>[0]>[0];

/**
 * Work a route adds to a change's own transaction (queueing the mail the change causes, src/lib/server/review-mail.ts),
 * run only when the change is made: it commits, or rolls back, with it.
 */
export type InTransaction<T> = (tx: Tx, made: T) => Promise<void>;

export interface SessionWithRole {
  session: AnalysisSession;
  study: Study;
  team: Team;
  role: Role;
}

// A session's versions and signatures, prepared once (drizzle `.prepare`: a named statement per connection, so
// neither the SQL text nor PostgreSQL's plan is made again per request).
const versionsOfSession = db
  .select({ number: recipeVersions.number, recipeHash: recipeVersions.recipeHash, createdAt: recipeVersions.createdAt, createdBy: recipeVersions.createdBy, summaryHash: summaries.summaryHash })
  .from(recipeVersions)
  .leftJoin(summaries, eq(summaries.recipeVersionId, recipeVersions.id))
  .where(eq(recipeVersions.analysisSessionId, sql.placeholder('sessionId')))
  .orderBy(asc(recipeVersions.number))
  .prepare('tidemark_versions_of_session');

const versionOfSession = db
  .select()
  .from(recipeVersions)
  .where(and(eq(recipeVersions.analysisSessionId, sql.placeholder('sessionId')), eq(recipeVersions.number, sql.placeholder('number'))))
  .prepare('tidemark_version_of_session');

const signaturesOfSession = db
  .select()
  .from(signatures)
  .where(eq(signatures.analysisSessionId, sql.placeholder('sessionId')))
  .orderBy(asc(signatures.signedAt), asc(signatures.id))
  .prepare('tidemark_signatures_of_session');

// The session every session route loads first, with the reader's role: a raw statement, so that it can also check
// the request's sign-in itself (db/queries/readers.ts; the note post does).
const sessionForReaderText = perReader(
  (r) => `SELECT ${columnsOf(analysisSessions, 's', 'session')}, ${columnsOf(studies, 'st', 'study')}, ${columnsOf(teams, 't', 'team')}, m.role${r.columns}
      FROM analysis_sessions s JOIN studies st ON st.id = s.study_id JOIN teams t ON t.id = st.team_id
      ${r.join}
      JOIN memberships m ON m.team_id = st.team_id AND m.user_id = ${r.userId}
     WHERE s.id = $1`,
);

/**
 * The analysis session when the reader belongs to its team, else null (callers answer 404); for a reader given by
 * sign-in, also null when the statement cannot vouch for the sign-in.
 */
export async function getSessionForReader(sessionId: string, reader: Reader): Promise<{ row: SessionWithRole; signIn: PlainSignInRow | null } | null> {
  if (!isUuid(sessionId)) return null;
  const r = readerSql(reader, 2);
  const { rows } = await pool.query<Record<string, unknown> & Partial<PlainSignInRow>>({ name: `tidemark_session_for_${r.key}`, text: sessionForReaderText(r), values: [sessionId, ...r.values] });
  const found = splitSignIn(rows[0]);
  if (!found) return null;
  const row = found.row;
  return { row: { session: rowOf(analysisSessions, row, 'session'), study: rowOf(studies, row, 'study'), team: rowOf(teams, row, 'team'), role: row.role as Role }, signIn: found.signIn };
}

/** The analysis session when the user belongs to its team, else null (callers answer 404). */
export async function getSessionForMember(sessionId: string, userId: string): Promise<SessionWithRole | null> {
  return (await getSessionForReader(sessionId, { userId }))?.row ?? null;
}

export interface NoteWithRole extends SessionWithRole {
  note: Note;
}

export async function getNoteForMember(noteId: string, userId: string): Promise<NoteWithRole | null> {
  if (!isUuid(noteId)) return null;
  const rows = await db
    .select({ note: notes, session: analysisSessions, study: studies, team: teams, role: memberships.role })
    .from(notes)
    .innerJoin(analysisSessions, eq(analysisSessions.id, notes.analysisSessionId))
    .innerJoin(studies, eq(studies.id, analysisSessions.studyId))
    .innerJoin(teams, eq(teams.id, studies.teamId))
    .innerJoin(memberships, and(eq(memberships.teamId, studies.teamId), eq(memberships.userId, userId)))
    .where(eq(notes.id, noteId))
    .limit(1);
  return rows[0] ?? null;
}

// ---------------------------------------------------------------- subjects and sessions

export async function listSubjects(studyId: string) {
  return db.select({ id: subjects.id, code: subjects.code, createdAt: subjects.createdAt }).from(subjects).where(eq(subjects.studyId, studyId)).orderBy(asc(subjects.code));
}

/** The study's subject with this code, created (and audited) when it is new. */
export async function ensureSubject(tx: Tx, studyId: string, teamId: string, actorId: string, code: string): Promise<{ id: string; code: string; created: boolean }> {
  const inserted = await tx.insert(subjects).values({ studyId, code, createdBy: actorId }).onConflictDoNothing().returning({ id: subjects.id, code: subjects.code });
  if (inserted[0]) {
    await recordAudit(tx, { actorId, action: 'subject.create', targetTable: 'subjects', targetId: inserted[0].id, teamId, detail: { studyId, code } });
    return { ...inserted[0], created: true };
  }
  const [existing] = await tx.select({ id: subjects.id, code: subjects.code }).from(subjects).where(and(eq(subjects.studyId, studyId), eq(subjects.code, code)));
  return { ...existing, created: false };
}

export async function createSubject(studyId: string, teamId: string, actorId: string, code: string) {
  return db.transaction((tx) => ensureSubject(tx, studyId, teamId, actorId, code));
}

/** The study's sessions with owner, current version and its signatures (the manifest), for the study page and the list route. */
export async function listSessionsWithManifest(studyId: string) {
  const rows = await db
    .select({ session: analysisSessions, ownerName: users.displayName })
    .from(analysisSessions)
    .innerJoin(users, eq(users.id, analysisSessions.ownerId))
    .where(eq(analysisSessions.studyId, studyId))
    .orderBy(asc(analysisSessions.subjectCode), asc(analysisSessions.createdAt));
  const ids = rows.map((r) => r.session.id);
  const sigs = ids.length ? await db.select().from(signatures).where(inArray(signatures.analysisSessionId, ids)).orderBy(asc(signatures.signedAt)) : [];
  return rows.map((r) => ({ ...r, signatures: sigs.filter((s) => s.analysisSessionId === r.session.id) }));
}

// ---------------------------------------------------------------- recipe versions and summaries

export type SaveVersionResult =
  | { ok: true; version: RecipeVersion; statusBefore: AnalysisSession['status']; statusAfter: AnalysisSession['status'] }
  | { ok: false; reason: 'stale'; current: RecipeVersion | null }
  | { ok: false; reason: 'in review' };

async function lockSession(tx: Tx, sessionId: string): Promise<AnalysisSession> {
  const [row] = await tx.select().from(analysisSessions).where(eq(analysisSessions.id, sessionId)).for('update');
  return row;
}

async function versionByNumber(tx: Tx | typeof db, sessionId: string, number: number | null): Promise<RecipeVersion | null> {
  if (number === null) return null;
  const [row] = await tx.select().from(recipeVersions).where(and(eq(recipeVersions.analysisSessionId, sessionId), eq(recipeVersions.number, number)));
  return row ?? null;
}

/**
 * Saves the next recipe version when `baseVersion` is still the current one; else reports the current version
 * (the route answers 409 with it). A session in review cannot change; a signed-off session goes back to draft with
 * its new, unsigned version, and its signatures stay bound to the versions they name.
 */
export async function saveRecipeVersion(ctx: SessionWithRole, actorId: string, baseVersion: number | null, recipe: Record<string, unknown>): Promise<SaveVersionResult> {
  return db.transaction(async (tx) => {
    const session = await lockSession(tx, ctx.session.id);
    if (session.currentVersion !== baseVersion) return { ok: false, reason: 'stale', current: await versionByNumber(tx, session.id, session.currentVersion) };
    if (session.status === 'in review') return { ok: false, reason: 'in review' };
    const number = (session.currentVersion ?? 0) + 1;
    const [version] = await tx.insert(recipeVersions).values({ analysisSessionId: session.id, number, recipe, recipeHash: jsonHash(recipe), createdBy: actorId }).returning();
    const statusAfter = session.status === 'signed off' ? 'draft' : session.status;
    await tx.update(analysisSessions).set({ currentVersion: number, status: statusAfter, updatedAt: sql`now()` }).where(eq(analysisSessions.id, session.id));
    await recordAudit(tx, {
      actorId, action: 'recipeVersion.save', targetTable: 'recipe_versions', targetId: version.id, teamId: ctx.team.id,
      detail: { analysisSessionId: session.id, studyId: ctx.study.id, subjectCode: session.subjectCode, number, recipeHash: version.recipeHash, ...(statusAfter !== session.status ? { status: { from: session.status, to: statusAfter } } : {}) },
    });
    return { ok: true, version, statusBefore: session.status, statusAfter };
  });
}

export async function listRecipeVersions(sessionId: string) {
  return versionsOfSession.execute({ sessionId });
}

export async function getRecipeVersion(sessionId: string, number: number): Promise<RecipeVersion | null> {
  const [row] = await versionOfSession.execute({ sessionId, number });
  return row ?? null;
}

/** The hash of a recipe version's summary, without reading the summary itself. */
export async function getSummaryHash(recipeVersionId: string): Promise<string | null> {
  const [row] = await db.select({ summaryHash: summaries.summaryHash }).from(summaries).where(eq(summaries.recipeVersionId, recipeVersionId));
  return row?.summaryHash ?? null;
}

export async function getSummary(recipeVersionId: string) {
  const [row] = await db.select().from(summaries).where(eq(summaries.recipeVersionId, recipeVersionId));
  return row ?? null;
}

export type UploadSummaryResult = { ok: true; summaryHash: string } | { ok: false; reason: 'exists'; summaryHash: string } | { ok: false; reason: 'in review' };

/** Stores the summary of a recipe version, once: a version's numbers never change after upload (a signature may cover them). */
export async function uploadSummary(ctx: SessionWithRole, version: RecipeVersion, actorId: string, summary: Record<string, unknown>, bytes: number): Promise<UploadSummaryResult> {
  const result = await storeSummary(ctx, version, actorId, summary, bytes);
  if (result.ok) await digestNewSummaries([version.id]);
  return result;
}

function storeSummary(ctx: SessionWithRole, version: RecipeVersion, actorId: string, summary: Record<string, unknown>, bytes: number): Promise<UploadSummaryResult> {
  return db.transaction(async (tx) => {
    const session = await lockSession(tx, ctx.session.id);
    const [existing] = await tx.select({ summaryHash: summaries.summaryHash }).from(summaries).where(eq(summaries.recipeVersionId, version.id));
    if (existing) return { ok: false, reason: 'exists', summaryHash: existing.summaryHash };
    if (session.status === 'in review' && session.currentVersion === version.number) return { ok: false, reason: 'in review' };
    const summaryHash = jsonHash(summary);
    await tx.insert(summaries).values({ recipeVersionId: version.id, summary, summaryHash, bytes, uploadedBy: actorId });
    await recordAudit(tx, {
      actorId, action: 'summary.upload', targetTable: 'summaries', targetId: version.id, teamId: ctx.team.id,
      detail: { analysisSessionId: session.id, studyId: ctx.study.id, subjectCode: session.subjectCode, recipeVersion: version.number, summaryHash, bytes },
    });
    return { ok: true, summaryHash };
  });
}

// ---------------------------------------------------------------- status changes and signatures

export type Meaning = Signature['meaning'];

export type StatusResult =
  | { ok: true; session: AnalysisSession; signature: Signature | null }
  | { ok: false; code: 'stale_version'; currentVersion: number | null }
  | { ok: false; code: 'out_of_order'; status: AnalysisSession['status'] };

/** Which status each change starts from and leads to: draft → in review → returned | signed off; returned → in review. */
export const transitions = {
  submit: { from: ['draft', 'returned'], to: 'in review' },
  return: { from: ['in review'], to: 'returned' },
  signOff: { from: ['in review'], to: 'signed off' },
  reviewed: { from: ['in review'], to: null },
} as const satisfies Record<string, { from: readonly AnalysisSession['status'][]; to: AnalysisSession['status'] | null }>;

const meaningOf = { return: 'returned', signOff: 'approved', reviewed: 'reviewed' } as const;

/**
 * Applies a status change (and, for return / sign-off / reviewed, writes the signature) when the session is in a
 * status it may change from and `recipeVersion` is still the current version. The signature records the signer's
 * printed name as the account shows it, the time (the database clock), the meaning, and the SHA-256 over the signed
 * content (src/lib/crypto/review-hash.ts).
 */
export async function applyStatusChange(
  ctx: SessionWithRole,
  signer: { id: string; displayName: string },
  change: keyof typeof transitions,
  recipeVersion: number,
  reason: string | null,
  then?: InTransaction<AnalysisSession>,
): Promise<StatusResult> {
  return db.transaction(async (tx) => {
    const session = await lockSession(tx, ctx.session.id);
    if (session.currentVersion !== recipeVersion) return { ok: false, code: 'stale_version', currentVersion: session.currentVersion };
    const rule = transitions[change];
    if (!(rule.from as readonly string[]).includes(session.status)) return { ok: false, code: 'out_of_order', status: session.status };
    let signature: Signature | null = null;
    if (change !== 'submit') {
      const version = (await versionByNumber(tx, session.id, recipeVersion))!;
      const [summary] = await tx.select({ summary: summaries.summary }).from(summaries).where(eq(summaries.recipeVersionId, version.id));
      const contentHash = signedContentHash({ analysisSessionId: session.id, fingerprint: session.fingerprint, recipeVersion, recipe: version.recipe, summary: summary?.summary ?? null });
      [signature] = await tx
        .insert(signatures)
        .values({ analysisSessionId: session.id, recipeVersionId: version.id, recipeVersionNumber: recipeVersion, signerId: signer.id, printedName: signer.displayName, meaning: meaningOf[change], reason, contentHash })
        .returning();
      await recordAudit(tx, {
        actorId: signer.id, action: 'signature.create', targetTable: 'signatures', targetId: signature.id, teamId: ctx.team.id,
        detail: { analysisSessionId: session.id, studyId: ctx.study.id, subjectCode: session.subjectCode, meaning: signature.meaning, recipeVersion, contentHash, printedName: signer.displayName },
      });
    }
    let updated = session;
    if (rule.to !== null) {
      [updated] = await tx
        .update(analysisSessions)
        .set({ status: rule.to, returnReason: change === 'return' ? reason : null, updatedAt: sql`now()` })
        .where(eq(analysisSessions.id, session.id))
        .returning();
      await recordAudit(tx, {
        actorId: signer.id, action: `analysisSession.${change}`, targetTable: 'analysis_sessions', targetId: session.id, teamId: ctx.team.id,
        detail: { studyId: ctx.study.id, subjectCode: session.subjectCode, from: session.status, to: rule.to, recipeVersion, ...(reason ? { reason } : {}) },
      });
      await then?.(tx, updated);
    }
    return { ok: true, session: updated, signature };
  });
}

/** A refused signing attempt (wrong password or throttled), audited in a transaction of its own so the refusal stays on record. */
export async function auditSigningRefused(ctx: SessionWithRole, userId: string, detail: Record<string, unknown>) {
  await recordAudit(db, { actorId: userId, action: 'signature.refused', targetTable: 'analysis_sessions', targetId: ctx.session.id, teamId: ctx.team.id, detail: { studyId: ctx.study.id, subjectCode: ctx.session.subjectCode, ...detail } });
}

export async function listSignatures(sessionId: string) {
  return signaturesOfSession.execute({ sessionId });
}

// ---------------------------------------------------------------- notes

export async function listNotes(sessionId: string) {
  return db
    .select({ note: notes, authorName: users.displayName, recipeVersion: recipeVersions.number })
    .from(notes)
    .innerJoin(users, eq(users.id, notes.authorId))
    .leftJoin(recipeVersions, eq(recipeVersions.id, notes.recipeVersionId))
    .where(eq(notes.analysisSessionId, sessionId))
    .orderBy(asc(notes.createdAt), asc(notes.id));
}

/** Those of `ids` who are members of the team (mentions of anyone else are refused by the route). */
export async function membersAmong(teamId: string, ids: string[]) {
  if (ids.length === 0) return [];
  return db
    .select({ id: users.id, email: users.email, displayName: users.displayName })
    .from(memberships)
    .innerJoin(users, eq(users.id, memberships.userId))
    .where(and(eq(memberships.teamId, teamId), inArray(memberships.userId, ids)));
}

export type CreateNoteResult = { ok: true; note: Note; replayed: boolean } | { ok: false; reason: 'key_reused' };

type NoteInput = { body: string; recipeVersionId: string | null; anchor: NoteAnchorT | null; mentions: string[]; parentId: string | null; clientKey?: string };

/**
 * Stores a note or a reply with its audit event. With a `clientKey` the author already used, nothing new is stored:
 * the same post (same session, thread and text) returns the stored note (`replayed`), so a client that resends after a
 * lost answer gets exactly one note; a different post under that key is refused. `then` (the mail of mentions) runs in
 * the note's transaction; without it the whole change is one message to PostgreSQL (`createNoteInOneMessage`).
 */
export async function createNote(ctx: SessionWithRole, authorId: string, input: NoteInput, then?: InTransaction<Note>): Promise<CreateNoteResult> {
  const stored = then ? await createNoteInTransaction(ctx, authorId, input, then) : await createNoteInOneMessage(ctx, authorId, input);
  if (stored) return { ok: true, note: stored, replayed: false };
  // Nothing inserted: the author already used this clientKey.
  const [earlier] = await db.select().from(notes).where(and(eq(notes.authorId, authorId), eq(notes.clientKey, input.clientKey!)));
  if (earlier.analysisSessionId !== ctx.session.id || earlier.parentId !== input.parentId || earlier.body !== input.body) return { ok: false, reason: 'key_reused' };
  return { ok: true, note: earlier, replayed: true };
}

/** A note's or reply's audit event; in the one-message post PostgreSQL supplies the actor, team, study and code. */
function noteEvent(
  noteId: string,
  actorId: string | SqlValue,
  place: { teamId: string | SqlValue; sessionId: string; studyId: string | SqlValue; subjectCode: string | SqlValue },
  input: { parentId: string | null; mentions: string[] },
): AuditInput {
  return {
    actorId, action: input.parentId ? 'note.reply' : 'note.create', targetTable: 'notes', targetId: noteId, teamId: place.teamId,
    detail: { analysisSessionId: place.sessionId, studyId: place.studyId, subjectCode: place.subjectCode, ...(input.parentId ? { parentId: input.parentId } : {}), mentions: input.mentions },
  };
}

/** The notes row as drizzle's `Note` names its fields (node-postgres parses times, jsonb and text[] the same way). */
const NOTE_FIELDS = `id, analysis_session_id AS "analysisSessionId", parent_id AS "parentId", recipe_version_id AS "recipeVersionId", anchor,
  author_id AS "authorId", body, mentions, revision, client_key AS "clientKey", resolved_at AS "resolvedAt", resolved_by AS "resolvedBy",
  created_at AS "createdAt", updated_at AS "updatedAt"`;

/**
 * The busiest write (note posts, issue 17) as one message in the simple query protocol: BEGIN, the insert, the
 * team's chain lock, the audit event (stored only when the note was: a clientKey used before inserts nothing) and
 * COMMIT. PostgreSQL runs them one after another; the lock is held only while the server inserts and commits, and the
 * request makes one round trip in place of four. Values go in as escaped literals (pg's `escapeLiteral`, as the
 * audit statements do). If a statement fails, those after it do not run and the transaction is rolled back.
 * Returns the stored note, or null when nothing was stored.
 */
async function createNoteInOneMessage(ctx: SessionWithRole, authorId: string, input: NoteInput): Promise<Note | null> {
  const id = randomUUID();
  const insert = `INSERT INTO notes (id, analysis_session_id, parent_id, recipe_version_id, anchor, author_id, body, mentions, client_key)
    VALUES (${literal(id)}::uuid, ${literal(ctx.session.id)}::uuid, ${literal(input.parentId)}::uuid, ${literal(input.recipeVersionId)}::uuid,
      ${input.anchor === null ? 'NULL' : `${literal(JSON.stringify(input.anchor))}::jsonb`}, ${literal(authorId)}, ${literal(input.body)},
      ARRAY[${input.mentions.map(literal).join(', ')}]::text[], ${literal(input.clientKey ?? null)}::uuid)
    ON CONFLICT DO NOTHING RETURNING ${NOTE_FIELDS}`;
  const { lock, insert: audit } = appendStatements(
    noteEvent(id, authorId, { teamId: ctx.team.id, sessionId: ctx.session.id, studyId: ctx.study.id, subjectCode: ctx.session.subjectCode }, input),
    { onlyIf: `EXISTS (SELECT 1 FROM notes WHERE id = ${literal(id)}::uuid)` },
  );
  const results = await preparedMessage<Note>(['BEGIN', insert, lock, audit, 'COMMIT']);
  return results[1].rows[0] ?? null;
}

/**
 * A note post in one round trip (issue 17): the request's sign-in, the membership, the role and the recipe version
 * are checked by the statement that inserts the note (`plainSignIn`, db/queries/readers.ts), and the audit event reads
 * the team, study and subject code in its own statement (`SqlValue`). Returns the note and the sign-in, or null when
 * nothing was stored: the sign-in needs the full check, the reader may not post here, the version is missing, or the
 * clientKey was used before. The caller then takes the ordinary path, which answers each of those as usual; nothing
 * was written. Only for a top-level note without mentions (mail needs a transaction of its own).
 */
export async function createNoteAsSignedIn(
  sessionId: string,
  signIn: { tokenHash: string; idleMinutes: number },
  allowedRoles: readonly Role[],
  input: { body: string; recipeVersion: number | null; anchor: NoteAnchorT | null; clientKey?: string },
): Promise<{ note: Note; signIn: PlainSignInRow } | null> {
  if (!isUuid(sessionId) || allowedRoles.length === 0) return null;
  const id = randomUUID();
  const noteValues = [
    id, sessionId, signIn.tokenHash, String(Math.trunc(signIn.idleMinutes)), `{${allowedRoles.join(',')}}`,
    input.recipeVersion === null ? null : String(input.recipeVersion), input.anchor === null ? null : JSON.stringify(input.anchor), input.body, input.clientKey ?? null,
  ];
  const auditValues: (string | null)[] = [id];
  const { lock, insert: audit } = appendStatements(
    noteEvent(id, new SqlValue('c.author_id'), { teamId: new SqlValue('c.team_id'), sessionId, studyId: new SqlValue('c.study_id'), subjectCode: new SqlValue('c.subject_code') }, { parentId: null, mentions: [] }),
    {
      from: NOTE_AUDIT_FROM,
      value: (v) => {
        auditValues.push(v);
        return `$${auditValues.length}`;
      },
    },
  );
  const results = await preparedMessage<Note & PlainSignInRow>([
    'BEGIN',
    { text: NOTE_INSERT, values: noteValues },
    { text: lock, values: [id] },
    { text: audit, values: auditValues },
    'COMMIT',
  ]);
  const row = results[1].rows[0];
  if (!row) return null;
  const split = splitSignIn(row);
  return split && split.signIn ? { note: split.row as Note, signIn: split.signIn } : null;
}

// The note post's statements (createNoteAsSignedIn), prepared once per connection. $1 note id, $2 session id, $3 the
// sign-in's token hash, $4 idle minutes, $5 roles that may post, $6 recipe version number or null, $7 anchor (JSON)
// or null, $8 body, $9 clientKey or null.
const NOTE_INSERT = `WITH ctx AS (
    SELECT s.id AS session_id,
           CASE WHEN $6::int IS NULL THEN NULL::uuid ELSE (SELECT v.id FROM recipe_versions v WHERE v.analysis_session_id = s.id AND v.number = $6::int) END AS version_id,
           me.*
      FROM analysis_sessions s JOIN studies st ON st.id = s.study_id
      CROSS JOIN ${plainSignIn('$3::text', '$4')}
      JOIN memberships m ON m.team_id = st.team_id AND m.user_id = me.user_id
     WHERE s.id = $2::uuid AND m.role::text = ANY($5::text[])
  ), made AS (
    INSERT INTO notes (id, analysis_session_id, parent_id, recipe_version_id, anchor, author_id, body, mentions, client_key)
    SELECT $1::uuid, ctx.session_id, NULL, ctx.version_id, $7::jsonb, ctx.user_id, $8::text, '{}'::text[], $9::uuid
      FROM ctx
     WHERE $6::int IS NULL OR ctx.version_id IS NOT NULL
    ON CONFLICT DO NOTHING RETURNING ${NOTE_FIELDS}
  )
  SELECT made.*, ctx.user_id, ctx.email, ctx.display_name, ctx.is_operator, ctx.session_created_at, ctx.last_used_at, ctx.expires_at FROM made, ctx`;

// What the note post's audit event reads in its own statements: the note's author, team, study and subject code.
const NOTE_AUDIT_FROM = `(SELECT st.team_id, st.id AS study_id, s.subject_code, x.author_id
    FROM notes x JOIN analysis_sessions s ON s.id = x.analysis_session_id JOIN studies st ON st.id = s.study_id WHERE x.id = $1::uuid) c`;

const preparedOn = new WeakMap<pg.PoolClient, Set<string>>();

/**
 * Statements as one simple-query message, those with values as `EXECUTE` of a statement this connection has
 * prepared (SQL PREPARE, named after its text's hash; prepared in the same message the first time): PostgreSQL plans
 * them once per connection, not per message. After a failure the transaction is rolled back, the connection
 * dropped (what it has prepared is then unknown), and the error thrown.
 */
async function preparedMessage<T extends pg.QueryResultRow>(statements: (string | { text: string; values: (string | null)[] })[]): Promise<pg.QueryResult<T>[]> {
  const client = await pool.connect();
  const known = preparedOn.get(client) ?? new Set<string>();
  // name → PREPARE statement, for the statements this connection has not prepared yet
  const preparing = new Map<string, string>();
  const sqlText = statements.map((st) => {
    if (typeof st === 'string') return st;
    const name = `tidemark_m_${createHash('sha256').update(st.text).digest('hex').slice(0, 16)}`;
    if (!known.has(name)) preparing.set(name, `PREPARE ${name} AS ${st.text}`);
    return `EXECUTE ${name}(${st.values.map(literal).join(', ')})`;
  });
  try {
    const results = (await client.query([...preparing.values(), ...sqlText].join(';\n'))) as unknown as pg.QueryResult<T>[];
    for (const name of preparing.keys()) known.add(name);
    preparedOn.set(client, known);
    client.release();
    return results.slice(preparing.size);
  } catch (error) {
    await client.query('ROLLBACK').catch(() => {});
    client.release(true);
    throw error;
  }
}

async function createNoteInTransaction(ctx: SessionWithRole, authorId: string, input: NoteInput, then: InTransaction<Note>): Promise<Note | null> {
  return db.transaction(async (tx) => {
    const [note] = await tx
      .insert(notes)
      .values({ analysisSessionId: ctx.session.id, parentId: input.parentId, recipeVersionId: input.recipeVersionId, anchor: input.anchor as Record<string, unknown> | null, authorId, body: input.body, mentions: input.mentions, clientKey: input.clientKey ?? null })
      .onConflictDoNothing()
      .returning();
    if (!note) return null;
    // The mention mail is queued first: the audit event and the commit are one last message (recordAuditAndCommit),
    // so the team's chain lock is never held across a round trip.
    await then(tx, note);
    await recordAuditAndCommit(tx, noteEvent(note.id, authorId, { teamId: ctx.team.id, sessionId: ctx.session.id, studyId: ctx.study.id, subjectCode: ctx.session.subjectCode }, input));
    return note;
  });
}

export type NoteChangeResult = { ok: true; note: Note } | { ok: false; current: Note };

/** Edits a note when `revision` is still its revision; else returns the current note (409). */
export async function editNote(ctx: NoteWithRole, actorId: string, revision: number, body: string, mentions: string[], then?: InTransaction<Note>): Promise<NoteChangeResult> {
  return db.transaction(async (tx) => {
    const [updated] = await tx
      .update(notes)
      .set({ body, mentions, revision: sql`${notes.revision} + 1`, updatedAt: sql`now()` })
      .where(and(eq(notes.id, ctx.note.id), eq(notes.revision, revision)))
      .returning();
    if (!updated) {
      const [current] = await tx.select().from(notes).where(eq(notes.id, ctx.note.id));
      return { ok: false, current };
    }
    await recordAudit(tx, {
      actorId, action: 'note.edit', targetTable: 'notes', targetId: updated.id, teamId: ctx.team.id,
      detail: { analysisSessionId: ctx.session.id, studyId: ctx.study.id, revision: updated.revision },
    });
    await then?.(tx, updated);
    return { ok: true, note: updated };
  });
}

export async function setNoteResolved(ctx: NoteWithRole, actorId: string, resolved: boolean): Promise<Note> {
  return db.transaction(async (tx) => {
    const [updated] = await tx
      .update(notes)
      .set(resolved ? { resolvedAt: sql`coalesce(${notes.resolvedAt}, now())`, resolvedBy: sql`coalesce(${notes.resolvedBy}, ${actorId})`, revision: sql`${notes.revision} + 1` } : { resolvedAt: null, resolvedBy: null, revision: sql`${notes.revision} + 1` })
      .where(eq(notes.id, ctx.note.id))
      .returning();
    await recordAudit(tx, {
      actorId, action: resolved ? 'note.resolve' : 'note.reopen', targetTable: 'notes', targetId: updated.id, teamId: ctx.team.id,
      detail: { analysisSessionId: ctx.session.id, studyId: ctx.study.id },
    });
    return updated;
  });
}

// ---------------------------------------------------------------- people and mail

/** A team's members for mentions: id, name and role (no e-mail addresses). */
export async function listMentionableMembers(teamId: string) {
  return db
    .select({ id: users.id, displayName: users.displayName, role: memberships.role })
    .from(memberships)
    .innerJoin(users, eq(users.id, memberships.userId))
    .where(and(eq(memberships.teamId, teamId), isNull(users.disabledAt)))
    .orderBy(asc(users.displayName));
}

/** The addresses of `userIds` who have not muted `kind` (and whose accounts are not suspended), read in `tx`. */
export async function mailRecipients(tx: Tx, userIds: string[], kind: MailKind) {
  if (userIds.length === 0) return [];
  return tx
    .select({ id: users.id, email: users.email, displayName: users.displayName })
    .from(users)
    .leftJoin(mailMutes, and(eq(mailMutes.userId, users.id), eq(mailMutes.kind, kind)))
    .where(and(inArray(users.id, userIds), isNull(mailMutes.userId), isNull(users.disabledAt)));
}

export async function teamLeadIds(tx: Tx, teamId: string): Promise<string[]> {
  const rows = await tx.select({ id: memberships.userId }).from(memberships).where(and(eq(memberships.teamId, teamId), eq(memberships.role, 'lead')));
  return rows.map((r) => r.id);
}

export async function listMutes(userId: string): Promise<MailKind[]> {
  const rows = await db.select({ kind: mailMutes.kind }).from(mailMutes).where(eq(mailMutes.userId, userId));
  return rows.map((r) => r.kind);
}

/** Replaces the person's mutes with `muted` (one audit event naming what changed). */
export async function setMutes(userId: string, muted: MailKind[]): Promise<void> {
  await db.transaction(async (tx) => {
    const before = (await tx.select({ kind: mailMutes.kind }).from(mailMutes).where(eq(mailMutes.userId, userId))).map((r) => r.kind).sort();
    await tx.delete(mailMutes).where(eq(mailMutes.userId, userId));
    if (muted.length) await tx.insert(mailMutes).values(muted.map((kind) => ({ userId, kind })));
    await recordAudit(tx, { actorId: userId, action: 'mail.mutes', targetTable: 'users', targetId: userId, detail: { before, after: [...muted].sort() } });
  });
}

// ---------------------------------------------------------------- activity (read from the audit chain)

/** The latest events of a team that concern one study (detail.studyId, or the study row itself), newest first. */
export async function listStudyActivity(teamId: string, studyId: string, limit = 50) {
  return db
    .select({ id: auditEvents.id, action: auditEvents.action, at: auditEvents.at, actorName: users.displayName, detail: auditEvents.detail, hash: auditEvents.hash })
    .from(auditEvents)
    .leftJoin(users, eq(users.id, auditEvents.actorId))
    .where(and(eq(auditEvents.teamId, teamId), sql`(${auditEvents.detail}->>'studyId' = ${studyId} OR (${auditEvents.targetTable} = 'studies' AND ${auditEvents.targetId} = ${studyId}))`))
    .orderBy(desc(auditEvents.id))
    .limit(limit);
}

/** The newest hash of a team's chain (shown so it can be copied elsewhere). */
export async function chainHead(teamId: string) {
  const [row] = await db.select({ id: auditEvents.id, hash: auditEvents.hash }).from(auditEvents).where(eq(auditEvents.teamId, teamId)).orderBy(desc(auditEvents.id)).limit(1);
  return row ?? null;
}
