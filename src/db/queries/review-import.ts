/**
 * Analysis sessions made in bulk or one by one, with the rule that a study has one session per subject and
 * recording: a second session for the same subject code and fingerprint is refused (the existing one gets new
 * recipe versions instead). The study page's batch import of command-line summaries writes every file's subject,
 * session, recipe version 1 and summary in one transaction: all or nothing.
 */
import { and, eq, sql } from 'drizzle-orm';
import { db } from '../client';
import { analysisSessions, recipeVersions, summaries, users, type AnalysisSession } from '../schema';
import type { CliSummaryFileT } from '../../lib/schemas/review';
import { jsonHash } from '../../lib/crypto/review-hash';
import { recordAudit } from './audit';
import { ensureSubject } from './review';
import { digestNewSummaries } from './cohort';

type Tx = Parameters<Parameters<typeof db.transaction>[0]>[0];

/** Serializes session creation per study, so two requests cannot both find no session and both make one. */
export async function lockStudySessions(tx: Tx, studyId: string): Promise<void> {
  await tx.execute(sql`select pg_advisory_xact_lock(hashtextextended(${`tidemark-study-sessions:${studyId}`}, 0))`);
}

export interface ExistingSession {
  id: string;
  status: AnalysisSession['status'];
  ownerName: string;
  currentVersion: number | null;
}

/** The study's session for this subject code and recording, if there is one. */
export async function sessionFor(tx: Tx | typeof db, studyId: string, subjectCode: string, fingerprint: string): Promise<ExistingSession | null> {
  const [row] = await tx
    .select({ id: analysisSessions.id, status: analysisSessions.status, ownerName: users.displayName, currentVersion: analysisSessions.currentVersion })
    .from(analysisSessions)
    .innerJoin(users, eq(users.id, analysisSessions.ownerId))
    .where(and(eq(analysisSessions.studyId, studyId), eq(analysisSessions.subjectCode, subjectCode), eq(analysisSessions.fingerprint, fingerprint)))
    .limit(1);
  return row ?? null;
}

/** The words every refusal of a second session uses (the route, the import and the page agree). */
export function duplicateSessionWords(subjectCode: string, existing: ExistingSession): string {
  return `Subject ${subjectCode} already has an analysis session for this recording (${existing.status}, ${existing.ownerName}${existing.currentVersion !== null ? `, recipe version ${existing.currentVersion}` : ''}). Open that session and save a new recipe version there instead of starting a second one.`;
}

export interface ImportItem {
  /** Position in the batch (0-based) and the name the upload gave the file. */
  index: number;
  name: string;
  file: CliSummaryFileT;
  summaryBytes: number;
}

export type ImportResult =
  | { ok: true; sessions: { index: number; id: string; versionId: string; subjectCode: string; subjectCreated: boolean; summaryHash: string }[] }
  | { ok: false; problems: { index: number; message: string; existingId: string }[] };

/**
 * Imports every item or none: per item the subject (created on first use), a draft session owned by the importer,
 * recipe version 1 and its summary, each with its audit event, then one event for the batch.
 */
export async function importSummaries(study: { id: string }, teamId: string, actorId: string, items: ImportItem[]): Promise<ImportResult> {
  const result = await storeImport(study, teamId, actorId, items);
  if (result.ok) await digestNewSummaries(result.sessions.map((s) => s.versionId));
  return result;
}

function storeImport(study: { id: string }, teamId: string, actorId: string, items: ImportItem[]): Promise<ImportResult> {
  return db.transaction(async (tx) => {
    await lockStudySessions(tx, study.id);
    const problems: { index: number; message: string; existingId: string }[] = [];
    for (const item of items) {
      const existing = await sessionFor(tx, study.id, item.file.subjectCode, item.file.fingerprint);
      if (existing) problems.push({ index: item.index, message: duplicateSessionWords(item.file.subjectCode, existing), existingId: existing.id });
    }
    if (problems.length > 0) return { ok: false, problems };
    const sessions: { index: number; id: string; versionId: string; subjectCode: string; subjectCreated: boolean; summaryHash: string }[] = [];
    for (const item of items) {
      const { subjectCode, fingerprint, recipe, summary } = item.file;
      const subject = await ensureSubject(tx, study.id, teamId, actorId, subjectCode);
      const [session] = await tx
        .insert(analysisSessions)
        .values({ studyId: study.id, ownerId: actorId, subjectId: subject.id, subjectCode: subject.code, fingerprint, currentVersion: 1 })
        .returning();
      await recordAudit(tx, {
        actorId, action: 'analysisSession.create', targetTable: 'analysis_sessions', targetId: session.id, teamId,
        detail: { studyId: study.id, subjectCode, fingerprint, imported: true },
      });
      const recipeJson = recipe as unknown as Record<string, unknown>;
      const [version] = await tx.insert(recipeVersions).values({ analysisSessionId: session.id, number: 1, recipe: recipeJson, recipeHash: jsonHash(recipeJson), createdBy: actorId }).returning();
      await recordAudit(tx, {
        actorId, action: 'recipeVersion.save', targetTable: 'recipe_versions', targetId: version.id, teamId,
        detail: { analysisSessionId: session.id, studyId: study.id, subjectCode, number: 1, recipeHash: version.recipeHash, imported: true },
      });
      const summaryJson = summary as unknown as Record<string, unknown>;
      const summaryHash = jsonHash(summaryJson);
      await tx.insert(summaries).values({ recipeVersionId: version.id, summary: summaryJson, summaryHash, bytes: item.summaryBytes, uploadedBy: actorId });
      await recordAudit(tx, {
        actorId, action: 'summary.upload', targetTable: 'summaries', targetId: version.id, teamId,
        detail: { analysisSessionId: session.id, studyId: study.id, subjectCode, recipeVersion: 1, summaryHash, bytes: item.summaryBytes, imported: true },
      });
      sessions.push({ index: item.index, id: session.id, versionId: version.id, subjectCode, subjectCreated: subject.created, summaryHash });
    }
    await recordAudit(tx, {
      actorId, action: 'summary.import', targetTable: 'studies', targetId: study.id, teamId,
      detail: { studyId: study.id, files: items.length, subjectCodes: sessions.map((s) => s.subjectCode) },
    });
    return { ok: true, sessions };
  });
}
