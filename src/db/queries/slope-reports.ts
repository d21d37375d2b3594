/** Slope check reports (issue 15): saved once with a study, listed newest first for its team. */
import { desc, eq } from 'drizzle-orm';
import { db } from '../client';
import { slopeReports, users } from '../schema';
import { SLOPE_REPORT_CAPS, type SlopeReportInputT, type SlopeReportListItem } from '../../lib/schemas/slope-reports';
import { recordAudit } from './audit';

/** Saves `input` with the study and records `slopeReport.save` in the team's audit trail, in one transaction. */
export async function createSlopeReport(study: { id: string; teamId: string }, actorId: string, input: SlopeReportInputT): Promise<SlopeReportListItem> {
  return db.transaction(async (tx) => {
    const [row] = await tx
      .insert(slopeReports)
      .values({ studyId: study.id, title: input.title, report: input as unknown as Record<string, unknown>, createdBy: actorId })
      .returning();
    await recordAudit(tx, {
      actorId,
      action: 'slopeReport.save',
      targetTable: 'slope_reports',
      targetId: row.id,
      teamId: study.teamId,
      detail: { studyId: study.id, title: input.title, settings: input.settings.map((s) => s.name), sensitivity: input.sensitivity !== null },
    });
    const [author] = await tx.select({ name: users.displayName }).from(users).where(eq(users.id, actorId));
    return { id: row.id, title: row.title, report: input, createdByName: author?.name ?? null, createdAt: row.createdAt.toISOString() };
  });
}

/** The study's reports, newest first (at most SLOPE_REPORT_CAPS.listed). */
export async function listSlopeReports(studyId: string): Promise<SlopeReportListItem[]> {
  const rows = await db
    .select({ report: slopeReports, createdByName: users.displayName })
    .from(slopeReports)
    .leftJoin(users, eq(users.id, slopeReports.createdBy))
    .where(eq(slopeReports.studyId, studyId))
    .orderBy(desc(slopeReports.createdAt), desc(slopeReports.id))
    .limit(SLOPE_REPORT_CAPS.listed);
  return rows.map((r) => ({ id: r.report.id, title: r.report.title, report: r.report.report as unknown as SlopeReportInputT, createdByName: r.createdByName, createdAt: r.report.createdAt.toISOString() }));
}
