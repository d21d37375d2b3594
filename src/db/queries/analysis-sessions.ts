import { asc, eq } from 'drizzle-orm';
import { db } from '../client';
import { analysisSessions, users, type AnalysisSession } from '../schema';
import { recordAudit } from './audit';

export async function listAnalysisSessions(studyId: string) {
  return db
    .select({ session: analysisSessions, ownerName: users.displayName })
    .from(analysisSessions)
    .innerJoin(users, eq(users.id, analysisSessions.ownerId))
    .where(eq(analysisSessions.studyId, studyId))
    .orderBy(asc(analysisSessions.subjectCode));
}

export async function createAnalysisSession(
  studyId: string,
  teamId: string,
  ownerId: string,
  input: { subjectCode: string; fingerprint: string | null },
): Promise<AnalysisSession> {
  return db.transaction(async (tx) => {
    const [row] = await tx
      .insert(analysisSessions)
      .values({ studyId, ownerId, subjectCode: input.subjectCode, fingerprint: input.fingerprint })
      .returning();
    await recordAudit(tx, {
      actorId: ownerId, action: 'analysisSession.create', targetTable: 'analysis_sessions', targetId: row.id, teamId,
      detail: { subjectCode: input.subjectCode },
    });
    return row;
  });
}
