import { asc, eq } from 'drizzle-orm';
import { db } from '../client';
import { analysisSessions, users, type AnalysisSession } from '../schema';
import { recordAudit } from './audit';
import { ensureSubject } from './review';
import { lockStudySessions, sessionFor, type ExistingSession } from './review-import';

export async function listAnalysisSessions(studyId: string) {
  return db
    .select({ session: analysisSessions, ownerName: users.displayName })
    .from(analysisSessions)
    .innerJoin(users, eq(users.id, analysisSessions.ownerId))
    .where(eq(analysisSessions.studyId, studyId))
    .orderBy(asc(analysisSessions.subjectCode));
}

/**
 * A new draft session for a subject of the study (the subject is created on first use of its code). A study keeps
 * one session per subject and recording: when one exists for this code and fingerprint, nothing is written and
 * `existing` names it (new work goes into it as a new recipe version).
 */
export async function createAnalysisSession(
  studyId: string,
  teamId: string,
  ownerId: string,
  input: { subjectCode: string; fingerprint: string | null },
): Promise<{ ok: true; session: AnalysisSession } | { ok: false; existing: ExistingSession }> {
  return db.transaction(async (tx) => {
    await lockStudySessions(tx, studyId);
    if (input.fingerprint !== null) {
      const existing = await sessionFor(tx, studyId, input.subjectCode, input.fingerprint);
      if (existing) return { ok: false, existing };
    }
    const subject = await ensureSubject(tx, studyId, teamId, ownerId, input.subjectCode);
    const [row] = await tx
      .insert(analysisSessions)
      .values({ studyId, ownerId, subjectId: subject.id, subjectCode: subject.code, fingerprint: input.fingerprint })
      .returning();
    await recordAudit(tx, {
      actorId: ownerId, action: 'analysisSession.create', targetTable: 'analysis_sessions', targetId: row.id, teamId,
      detail: { studyId, subjectCode: input.subjectCode, fingerprint: input.fingerprint },
    });
    return { ok: true, session: row };
  });
}
