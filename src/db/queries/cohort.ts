/**
 * The Cohort screen's queries (issue 12): a study's sessions with their current recipe version, the summary's
 * outline and a per-band digest (for the first paint), the full summaries (for group results), covariates and the
 * saved design. Summaries stay as stored; nothing here changes a session, a version or a signature.
 */
import { and, asc, eq, inArray, sql } from 'drizzle-orm';
import { db, pool } from '../client';
import { analysisSessions, cohortDesigns, recipeVersions, signatures, subjectCovariates, subjects, summaries, summaryDigests, users, type CohortDesign } from '../schema';
import type { CohortDesignT, CovariatesInputT } from '../../lib/schemas/cohort';
import { recordAudit } from './audit';
import type { CohortOverview, CohortSessionRow } from '../../lib/cohort/overview';

export type { CohortOverview, CohortSessionRow } from '../../lib/cohort/overview';

// The Cohort screen's first reads, prepared once (drizzle `.prepare`: a named statement per connection, so neither
// the SQL text nor PostgreSQL's plan is made again per request).
const overviewRows = db
  .select({
    session: analysisSessions,
    ownerName: users.displayName,
    versionId: recipeVersions.id,
    // As JSON text: the API route splices it into its answer as it is, never parsed and written again.
    recipe: sql<string | null>`${recipeVersions.recipe}::text`,
    recipeHash: recipeVersions.recipeHash,
    // Only the hash: the summary itself (hundreds of kB each) is not read for the first paint.
    summaryHash: summaries.summaryHash,
    outline: sql<string | null>`${summaryDigests.outline}::text`,
    digest: sql<string | null>`${summaryDigests.digest}::text`,
  })
  .from(analysisSessions)
  .innerJoin(users, eq(users.id, analysisSessions.ownerId))
  .leftJoin(recipeVersions, and(eq(recipeVersions.analysisSessionId, analysisSessions.id), eq(recipeVersions.number, analysisSessions.currentVersion)))
  .leftJoin(summaries, eq(summaries.recipeVersionId, recipeVersions.id))
  .leftJoin(summaryDigests, eq(summaryDigests.recipeVersionId, recipeVersions.id))
  .where(eq(analysisSessions.studyId, sql.placeholder('studyId')))
  .orderBy(asc(analysisSessions.subjectCode), asc(analysisSessions.createdAt))
  .prepare('tidemark_cohort_rows');

const overviewSignatures = db
  .select({ signature: signatures })
  .from(signatures)
  .innerJoin(analysisSessions, eq(analysisSessions.id, signatures.analysisSessionId))
  .where(eq(analysisSessions.studyId, sql.placeholder('studyId')))
  .orderBy(asc(signatures.signedAt), asc(signatures.id))
  .prepare('tidemark_cohort_signatures');

const overviewSubjects = db
  .select({ code: subjects.code })
  .from(subjects)
  .where(eq(subjects.studyId, sql.placeholder('studyId')))
  .orderBy(asc(subjects.code))
  .prepare('tidemark_cohort_subjects');

/** A session row of the overview with its recipe, outline and digest still as JSON text. */
type OverviewRowText = Omit<CohortSessionRow, 'recipe' | 'outline' | 'digest'> & { recipe: string; outline: string; digest: string };

/** Everything the Cohort screen paints first: five independent reads, whatever the number of sessions. */
async function overviewParts(studyId: string): Promise<{ sessions: OverviewRowText[]; rest: Omit<CohortOverview, 'sessions'> }> {
  // Two rounds of reads, at most three connections at once: the pool (10) stays open to the requests around it.
  const [rows, signed] = await Promise.all([overviewRows.execute({ studyId }), overviewSignatures.execute({ studyId })]);
  const [covariates, subjectRows, design] = await Promise.all([listCovariates(studyId), overviewSubjects.execute({ studyId }), getCohortDesign(studyId)]);
  const sigs = signed.map((r) => r.signature);
  const missing = rows.flatMap((r) => (r.versionId !== null && r.summaryHash !== null && r.digest === null ? [r.versionId] : []));
  const made = await storeDigests(missing);
  const bySession = new Map<string, typeof sigs>();
  for (const sig of sigs) bySession.set(sig.analysisSessionId, [...(bySession.get(sig.analysisSessionId) ?? []), sig]);
  const madeText = (versionId: string | null, part: 'outline' | 'digest') => {
    const value = versionId ? made.get(versionId)?.[part] : undefined;
    return value === undefined ? null : JSON.stringify(value);
  };
  return {
    sessions: rows.map((r) => ({
      analysisSessionId: r.session.id,
      subject: r.session.subjectCode,
      subjectId: r.session.subjectId,
      ownerName: r.ownerName,
      status: r.session.status,
      fingerprint: r.session.fingerprint,
      recipeVersion: r.session.currentVersion,
      recipeHash: r.recipeHash,
      summaryHash: r.summaryHash,
      signatures: (bySession.get(r.session.id) ?? [])
        .map((s) => ({ printedName: s.printedName, meaning: s.meaning, signedAt: s.signedAt.toISOString(), recipeVersionNumber: s.recipeVersionNumber, contentHash: s.contentHash, reason: s.reason })),
      recipe: r.recipe ?? 'null',
      outline: r.outline ?? madeText(r.versionId, 'outline') ?? 'null',
      digest: r.digest ?? madeText(r.versionId, 'digest') ?? '{}',
    })),
    rest: { covariates, subjects: subjectRows.map((s) => s.code), design },
  };
}

/** The Cohort screen's first data (pages render it on the server). */
export async function getCohortOverview(studyId: string): Promise<CohortOverview> {
  const { sessions, rest } = await overviewParts(studyId);
  return {
    sessions: sessions.map((r) => ({ ...r, recipe: JSON.parse(r.recipe), outline: JSON.parse(r.outline), digest: JSON.parse(r.digest) })),
    ...rest,
  };
}

/**
 * The same overview as JSON text, for the API route: each session's recipe, outline and digest are PostgreSQL's own
 * JSON text, spliced in as they are (the busiest cohort read; parsing and writing them again was most of its cost).
 */
export async function cohortOverviewJson(studyId: string): Promise<string> {
  const { sessions, rest } = await overviewParts(studyId);
  const rows = sessions.map(({ recipe, outline, digest, ...plain }) => `${JSON.stringify(plain).slice(0, -1)},"recipe":${recipe},"outline":${outline},"digest":${digest}}`);
  return `{"sessions":[${rows.join(',')}],${JSON.stringify(rest).slice(1)}`;
}

/**
 * Stores the Cohort screen's outline and digest of freshly uploaded summaries right away, so the screen's first paint
 * reads only digests (a first view of 200 undigested summaries took about 5 s). Best effort, after the upload has
 * committed: a digest that fails here is made by the first view instead, as before.
 */
export async function digestNewSummaries(versionIds: string[]): Promise<void> {
  try {
    await storeDigests(versionIds);
  } catch (error) {
    console.error(`[tidemark] cohort digest of ${versionIds.length} new summary(ies) left for the first view: ${error instanceof Error ? error.message : String(error)}`);
  }
}

/**
 * Computes and stores the outline and digest of each recipe version in `versionIds` (each has a summary and no
 * digest yet): the averaging runs inside PostgreSQL, and a digest written by a concurrent view is kept.
 */
async function storeDigests(versionIds: string[]): Promise<Map<string, { outline: CohortSessionRow['outline']; digest: CohortSessionRow['digest'] }>> {
  const out = new Map<string, { outline: CohortSessionRow['outline']; digest: CohortSessionRow['digest'] }>();
  if (versionIds.length === 0) return out;
  const { rows } = await pool.query<{ id: string; outline: CohortSessionRow['outline']; digest: CohortSessionRow['digest'] }>(
    `with cells as (
       select s.recipe_version_id as id, bv->>'band' as band, bv->>'window' as win, bv->>'condition' as cond,
              avg((bv->>'normalized')::float8) as v
         from summaries s cross join lateral jsonb_array_elements(s.summary->'bandValues') bv
        where s.recipe_version_id = any($1::uuid[])
        group by 1, 2, 3, 4),
     by_window as (select id, band, win, jsonb_object_agg(cond, v) as c from cells group by 1, 2, 3),
     by_band as (select id, band, jsonb_object_agg(win, c) as w from by_window group by 1, 2),
     digests as (select id, jsonb_object_agg(band, w) as digest from by_band group by 1)
     insert into summary_digests (recipe_version_id, outline, digest)
     select s.recipe_version_id,
            jsonb_build_object('normalizedUnit', s.summary->'normalizedUnit', 'bands', s.summary->'bands', 'windows', s.summary->'windows',
                               'conditions', s.summary->'conditions', 'channels', s.summary->'channels', 'channelGroups', s.summary->'channelGroups'),
            coalesce(d.digest, '{}'::jsonb)
       from summaries s left join digests d on d.id = s.recipe_version_id
      where s.recipe_version_id = any($1::uuid[])
     on conflict (recipe_version_id) do nothing
     returning recipe_version_id as id, outline, digest`,
    [versionIds],
  );
  for (const r of rows) out.set(r.id, { outline: r.outline, digest: r.digest });
  const lost = versionIds.filter((id) => !out.has(id));
  if (lost.length > 0) {
    for (const r of await db.select().from(summaryDigests).where(inArray(summaryDigests.recipeVersionId, lost))) {
      out.set(r.recipeVersionId, { outline: r.outline as unknown as CohortSessionRow['outline'], digest: r.digest as unknown as CohortSessionRow['digest'] });
    }
  }
  return out;
}

/**
 * The stored summaries of the given sessions' current versions, as one JSON text `{"summaries":{"<id>":{…}}}`
 * assembled from PostgreSQL's own text of each summary (no parse and re-serialize of large arrays in Node).
 * Sessions of another study, or without a summary, are left out.
 */
export async function cohortSummariesJson(studyId: string, sessionIds: string[]): Promise<string> {
  if (sessionIds.length === 0) return '{"summaries":{}}';
  const { rows } = await pool.query<{ id: string; summary: string }>(
    `select a.id, s.summary::text as summary
       from analysis_sessions a
       join recipe_versions v on v.analysis_session_id = a.id and v.number = a.current_version
       join summaries s on s.recipe_version_id = v.id
      where a.study_id = $1 and a.id = any($2::uuid[])`,
    [studyId, sessionIds],
  );
  return `{"summaries":{${rows.map((r) => `${JSON.stringify(r.id)}:${r.summary}`).join(',')}}}`;
}

const covariatesOfStudy = db
  .select({ subject: subjects.code, name: subjectCovariates.name, value: subjectCovariates.value })
  .from(subjectCovariates)
  .innerJoin(subjects, eq(subjects.id, subjectCovariates.subjectId))
  .where(eq(subjects.studyId, sql.placeholder('studyId')))
  .orderBy(asc(subjectCovariates.name), asc(subjects.code))
  .prepare('tidemark_covariates_of_study');

const designOfStudy = db.select().from(cohortDesigns).where(eq(cohortDesigns.studyId, sql.placeholder('studyId'))).prepare('tidemark_design_of_study');

export async function listCovariates(studyId: string): Promise<CohortOverview['covariates']> {
  const rows = await covariatesOfStudy.execute({ studyId });
  const names = [...new Set(rows.map((r) => r.name))];
  const bySubject: Record<string, Record<string, number>> = {};
  for (const r of rows) (bySubject[r.subject] ??= {})[r.name] = r.value;
  return { names, bySubject };
}

export type SaveCovariatesResult = { ok: true; saved: number } | { ok: false; row: number; subject: string };

/**
 * Replaces the study's covariates with `input` in one transaction (with its audit event). A subject code that is
 * not a subject of the study refuses the whole save, naming its row; nothing changes then.
 */
export async function saveCovariates(study: { id: string; teamId: string }, actorId: string, input: CovariatesInputT): Promise<SaveCovariatesResult> {
  return db.transaction(async (tx) => {
    const known = await tx.select({ id: subjects.id, code: subjects.code }).from(subjects).where(eq(subjects.studyId, study.id));
    const idOf = new Map(known.map((s) => [s.code, s.id]));
    const missing = input.rows.findIndex((r) => !idOf.has(r.subject));
    if (missing >= 0) return { ok: false, row: missing, subject: input.rows[missing].subject };
    if (known.length > 0) await tx.delete(subjectCovariates).where(inArray(subjectCovariates.subjectId, known.map((s) => s.id)));
    const values = input.rows.flatMap((r) =>
      input.names.flatMap((name, i) => (r.values[i] === null || r.values[i] === undefined ? [] : [{ subjectId: idOf.get(r.subject)!, name, value: r.values[i] as number, updatedBy: actorId }])),
    );
    if (values.length > 0) await tx.insert(subjectCovariates).values(values);
    await recordAudit(tx, { actorId, action: 'covariates.save', targetTable: 'subject_covariates', targetId: study.id, teamId: study.teamId, detail: { studyId: study.id, names: input.names, subjects: input.rows.length, values: values.length } });
    return { ok: true, saved: values.length };
  });
}

export async function getCohortDesign(studyId: string): Promise<CohortOverview['design']> {
  const [row] = await designOfStudy.execute({ studyId });
  return row ? { revision: row.revision, cohort: row.design as unknown as CohortDesignT, updatedAt: row.updatedAt.toISOString() } : null;
}

export type SaveDesignResult = { ok: true; design: CohortDesign } | { ok: false; current: CohortOverview['design'] };

/** Saves the design when `revision` is still the stored one (null: none stored yet); else reports the current one (409). */
export async function saveCohortDesign(study: { id: string; teamId: string }, actorId: string, revision: number | null, cohort: CohortDesignT): Promise<SaveDesignResult> {
  return db.transaction(async (tx) => {
    const [current] = await tx.select().from(cohortDesigns).where(eq(cohortDesigns.studyId, study.id)).for('update');
    if ((current?.revision ?? null) !== revision) {
      return { ok: false, current: current ? { revision: current.revision, cohort: current.design as unknown as CohortDesignT, updatedAt: current.updatedAt.toISOString() } : null };
    }
    const design = cohort as unknown as Record<string, unknown>;
    const [row] = current
      ? await tx.update(cohortDesigns).set({ design, revision: current.revision + 1, updatedBy: actorId, updatedAt: sql`now()` }).where(eq(cohortDesigns.studyId, study.id)).returning()
      : await tx.insert(cohortDesigns).values({ studyId: study.id, design, updatedBy: actorId }).onConflictDoNothing().returning();
    if (!row) return { ok: false, current: await getCohortDesign(study.id) };
    await recordAudit(tx, { actorId, action: 'cohortDesign.save', targetTable: 'cohort_designs', targetId: study.id, teamId: study.teamId, detail: { studyId: study.id, revision: row.revision, tests: cohort.design.tests.map((t) => t.name) } });
    return { ok: true, design: row };
  });
}
