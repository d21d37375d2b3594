import { index, jsonb, pgTable, text, timestamp, uuid } from 'drizzle-orm/pg-core';
import { users } from './auth';
import { studies } from './teams';

/**
 * Slope check reports (issue 15): a bench's settings and figures and a channel's sensitivity results
 * (src/lib/schemas/slope-reports.ts, SlopeReportInput), saved with a study for its team. Written once.
 */
export const slopeReports = pgTable(
  'slope_reports',
  {
    id: uuid('id').primaryKey().defaultRandom(),
    studyId: uuid('study_id')
      .notNull()
      .references(() => studies.id, { onDelete: 'cascade' }),
    title: text('title').notNull(),
    report: jsonb('report').$type<Record<string, unknown>>().notNull(),
    createdBy: text('created_by').references(() => users.id, { onDelete: 'set null' }),
    createdAt: timestamp('created_at', { withTimezone: true }).notNull().defaultNow(),
  },
  (t) => [index('slope_reports_study_created_idx').on(t.studyId, t.createdAt)],
);
export type SlopeReport = typeof slopeReports.$inferSelect;
