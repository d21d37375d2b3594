import { pgEnum, pgTable, text, timestamp, uuid, index } from 'drizzle-orm/pg-core';
import { users } from './auth';
import { studies } from './teams';

export const analysisStatusEnum = pgEnum('analysis_status', ['draft', 'in review', 'returned', 'signed off']);

/**
 * One subject's recording analysed with a recipe. The recording itself stays on the analyst's device; the
 * server knows it only by the SHA-256 fingerprint of its bytes and the subject code the team chose.
 */
export const analysisSessions = pgTable(
  'analysis_sessions',
  {
    id: uuid('id').primaryKey().defaultRandom(),
    studyId: uuid('study_id')
      .notNull()
      .references(() => studies.id, { onDelete: 'cascade' }),
    ownerId: text('owner_id')
      .notNull()
      .references(() => users.id, { onDelete: 'restrict' }),
    subjectCode: text('subject_code').notNull(),
    fingerprint: text('fingerprint'),
    status: analysisStatusEnum('status').notNull().default('draft'),
    createdAt: timestamp('created_at', { withTimezone: true }).notNull().defaultNow(),
    updatedAt: timestamp('updated_at', { withTimezone: true }).notNull().defaultNow(),
  },
  (t) => [index('analysis_sessions_study_idx').on(t.studyId)],
);
export type AnalysisSession = typeof analysisSessions.$inferSelect;
