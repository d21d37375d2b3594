import { integer, pgEnum, pgTable, text, timestamp, uuid, index, uniqueIndex } from 'drizzle-orm/pg-core';
import { users } from './auth';
import { studies } from './teams';

/** A study's subject: a code the team chose (a pseudonym, never a name), unique within the study. */
export const subjects = pgTable(
  'subjects',
  {
    id: uuid('id').primaryKey().defaultRandom(),
    studyId: uuid('study_id')
      .notNull()
      .references(() => studies.id, { onDelete: 'cascade' }),
    code: text('code').notNull(),
    createdBy: text('created_by').references(() => users.id, { onDelete: 'set null' }),
    createdAt: timestamp('created_at', { withTimezone: true }).notNull().defaultNow(),
  },
  (t) => [uniqueIndex('subjects_study_code_idx').on(t.studyId, t.code)],
);
export type Subject = typeof subjects.$inferSelect;

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
    subjectId: uuid('subject_id')
      .notNull()
      .references(() => subjects.id, { onDelete: 'restrict' }),
    /** The subject's code, kept beside subject_id for listing (a subject's code never changes). */
    subjectCode: text('subject_code').notNull(),
    fingerprint: text('fingerprint'),
    status: analysisStatusEnum('status').notNull().default('draft'),
    /** The number of the current recipe version (recipe_versions.number); null before the first save. */
    currentVersion: integer('current_version'),
    /** The reason given when the session was last returned; null otherwise. */
    returnReason: text('return_reason'),
    createdAt: timestamp('created_at', { withTimezone: true }).notNull().defaultNow(),
    updatedAt: timestamp('updated_at', { withTimezone: true }).notNull().defaultNow(),
  },
  (t) => [index('analysis_sessions_study_idx').on(t.studyId)],
);
export type AnalysisSession = typeof analysisSessions.$inferSelect;
