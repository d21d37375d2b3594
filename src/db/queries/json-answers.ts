/**
 * The busiest reads, answered with PostgreSQL's own JSON text (issue 17): one prepared statement checks that the
 * person belongs to the team and builds the whole answer (`json_build_object`, `json_agg`), so the route sends it as
 * it is. One round trip in place of four, and no row is turned into objects and back into text in this process.
 * The reader is a user id, or the request's sign-in, checked in the same statement (db/queries/readers.ts).
 *
 * The text is the same JSON the object-building code wrote before: the same keys and values; times as
 * `Date.prototype.toJSON` writes them (ISO 8601 in UTC with milliseconds, `ISO_UTC`: PostgreSQL's `MS` keeps the
 * first three digits of the microseconds, as node-postgres's parse does); jsonb columns as PostgreSQL writes them
 * (keys in jsonb's order, which is the order node-postgres parsed them in before). tests/integration/json-answers
 * compares each answer with the object-built one.
 */
import type { Role } from '../../lib/permissions';
import { pool } from '../client';
import { isUuid } from './teams';
import { perReader, readerSql, splitSignIn, type PlainSignInRow, type Reader } from './readers';

/** `Date.prototype.toJSON` in SQL: `2026-12-02T18:27:30.123Z` (ECMA-262 §21.4.4.36, the ISO 8601 subset it uses). */
export const isoUtc = (column: string): string => `to_char(${column} AT TIME ZONE 'UTC', 'YYYY-MM-DD"T"HH24:MI:SS.MS"Z"')`;

// The session page's and the review clients' read of one analysis session (GET /api/analysis-sessions/<id>).
const sessionManifest = perReader((r) => `
SELECT m.role${r.columns},
  json_build_object(
    'analysisSession', json_build_object(
      'id', s.id, 'studyId', s.study_id, 'subjectId', s.subject_id, 'subjectCode', s.subject_code, 'fingerprint', s.fingerprint,
      'ownerId', s.owner_id, 'status', s.status, 'returnReason', s.return_reason, 'currentVersion', s.current_version,
      'createdAt', ${isoUtc('s.created_at')}, 'updatedAt', ${isoUtc('s.updated_at')}),
    'current', (
      SELECT json_build_object('number', v.number, 'recipe', v.recipe, 'recipeHash', v.recipe_hash, 'createdBy', v.created_by,
                               'createdAt', ${isoUtc('v.created_at')}, 'summaryHash', sm.summary_hash)
        FROM recipe_versions v LEFT JOIN summaries sm ON sm.recipe_version_id = v.id
       WHERE v.analysis_session_id = s.id AND v.number = s.current_version),
    'versions', coalesce((
      SELECT json_agg(json_build_object('number', v.number, 'recipeHash', v.recipe_hash, 'createdAt', ${isoUtc('v.created_at')},
                                        'createdBy', v.created_by, 'summaryHash', sm.summary_hash) ORDER BY v.number)
        FROM recipe_versions v LEFT JOIN summaries sm ON sm.recipe_version_id = v.id
       WHERE v.analysis_session_id = s.id), '[]'::json),
    'signatures', coalesce((
      SELECT json_agg(json_build_object('id', g.id, 'recipeVersion', g.recipe_version_number, 'signerId', g.signer_id,
                                        'printedName', g.printed_name, 'meaning', g.meaning, 'reason', g.reason,
                                        'contentHash', g.content_hash, 'signedAt', ${isoUtc('g.signed_at')}) ORDER BY g.signed_at, g.id)
        FROM signatures g
       WHERE g.analysis_session_id = s.id), '[]'::json)
  )::text AS body
FROM analysis_sessions s
JOIN studies st ON st.id = s.study_id
${r.join}
JOIN memberships m ON m.team_id = st.team_id AND m.user_id = ${r.userId}
WHERE s.id = $1`);

/**
 * One analysis session as the API answers it (subject, owner, status, the current recipe version with its summary's
 * hash, every version's number and hashes, the signatures), with the reader's role in its team; null when there is
 * no such session or the reader is not a member of its team (the route answers 404 either way) — or, for a reader
 * given by sign-in, when the sign-in is not one the statement can vouch for (db/queries/readers.ts).
 */
export async function sessionManifestJson(sessionId: string, reader: Reader): Promise<{ row: { role: Role; body: string }; signIn: PlainSignInRow | null } | null> {
  if (!isUuid(sessionId)) return null;
  const r = readerSql(reader, 2);
  const { rows } = await pool.query<{ role: Role; body: string } & Partial<PlainSignInRow>>({ name: `tidemark_session_manifest_${r.key}`, text: sessionManifest(r), values: [sessionId, ...r.values] });
  return splitSignIn(rows[0]);
}

// The Cohort screen's first data (GET /api/studies/<id>/cohort): every session with its current recipe version,
// summary hash, outline, digest and signatures, then the covariates, the subjects and the saved design. `undigested`
// says a current summary has no outline and digest yet; the route then takes the path that makes them
// (cohortOverviewJson in cohort.ts), which happens once per summary. Rows become JSON through json_agg of a row
// whose columns are the answer's keys (a quarter cheaper in PostgreSQL than json_build_object per session), and
// `undigested` comes from the same scan.
const cohortOverview = perReader((r) => `
SELECT m.role, o.undigested${r.columns},
  json_build_object(
    'sessions', coalesce(o.sessions, '[]'::json),
    'covariates', json_build_object(
      'names', coalesce((
        SELECT json_agg(n.name ORDER BY n.name)
          FROM (SELECT DISTINCT c.name FROM subject_covariates c JOIN subjects sb ON sb.id = c.subject_id WHERE sb.study_id = st.id) n), '[]'::json),
      'bySubject', coalesce((
        SELECT json_object_agg(x.code, x.vals ORDER BY x.code)
          FROM (SELECT sb.code, json_object_agg(c.name, c.value ORDER BY c.name) AS vals
                  FROM subject_covariates c JOIN subjects sb ON sb.id = c.subject_id
                 WHERE sb.study_id = st.id GROUP BY sb.code) x), '{}'::json)),
    'subjects', coalesce((SELECT json_agg(sb.code ORDER BY sb.code) FROM subjects sb WHERE sb.study_id = st.id), '[]'::json),
    'design', (SELECT json_build_object('revision', cd.revision, 'cohort', cd.design, 'updatedAt', ${isoUtc('cd.updated_at')})
                 FROM cohort_designs cd WHERE cd.study_id = st.id)
  )::text AS body
FROM studies st
${r.join}
JOIN memberships m ON m.team_id = st.team_id AND m.user_id = ${r.userId}
CROSS JOIN LATERAL (
  SELECT json_agg(j ORDER BY a.subject_code, a.created_at) AS sessions,
         coalesce(bool_or(sm.summary_hash IS NOT NULL AND d.recipe_version_id IS NULL), false) AS undigested
    FROM analysis_sessions a
    JOIN users u ON u.id = a.owner_id
    LEFT JOIN recipe_versions v ON v.analysis_session_id = a.id AND v.number = a.current_version
    LEFT JOIN summaries sm ON sm.recipe_version_id = v.id
    LEFT JOIN summary_digests d ON d.recipe_version_id = v.id
    CROSS JOIN LATERAL (
      SELECT a.id AS "analysisSessionId", a.subject_code AS subject, a.subject_id AS "subjectId", u.display_name AS "ownerName",
             a.status, a.fingerprint, a.current_version AS "recipeVersion", v.recipe_hash AS "recipeHash", sm.summary_hash AS "summaryHash",
             coalesce((SELECT json_agg(g ORDER BY s.signed_at, s.id)
                         FROM signatures s
                         CROSS JOIN LATERAL (
                           SELECT s.printed_name AS "printedName", s.meaning, ${isoUtc('s.signed_at')} AS "signedAt",
                                  s.recipe_version_number AS "recipeVersionNumber", s.content_hash AS "contentHash", s.reason) g
                        WHERE s.analysis_session_id = a.id), '[]'::json) AS signatures,
             v.recipe, d.outline, coalesce(d.digest, '{}'::jsonb) AS digest) j
   WHERE a.study_id = st.id
) o
WHERE st.id = $1`);

/**
 * The Cohort screen's first data as the API answers it, with the reader's role; null when there is no such study
 * or the reader is not a member of its team (or, for a reader given by sign-in, when the statement cannot vouch for
 * it). `undigested`: a current summary still needs its outline and digest (the route then answers from
 * cohortOverviewJson, which makes them).
 */
export async function cohortOverviewAnswer(studyId: string, reader: Reader): Promise<{ row: { role: Role; undigested: boolean; body: string }; signIn: PlainSignInRow | null } | null> {
  if (!isUuid(studyId)) return null;
  const r = readerSql(reader, 2);
  const { rows } = await pool.query<{ role: Role; undigested: boolean; body: string } & Partial<PlainSignInRow>>({ name: `tidemark_cohort_overview_${r.key}`, text: cohortOverview(r), values: [studyId, ...r.values] });
  return splitSignIn(rows[0]);
}
