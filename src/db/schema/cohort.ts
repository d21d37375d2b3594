import { doublePrecision, integer, jsonb, pgTable, primaryKey, text, timestamp, uuid } from 'drizzle-orm/pg-core';
import { users } from './auth';
import { recipeVersions } from './review';
import { subjects } from './analysis';
import { studies } from './teams';

/**
 * The Cohort screen (issue 12): per-subject covariates (numbers such as age or a group coded 0/1, never a name)
 * and the design of the group tests, saved with the study.
 */
export const subjectCovariates = pgTable(
  'subject_covariates',
  {
    subjectId: uuid('subject_id')
      .notNull()
      .references(() => subjects.id, { onDelete: 'cascade' }),
    /** A short identifier (`age`, `group`), the column name of the tidy export. */
    name: text('name').notNull(),
    value: doublePrecision('value').notNull(),
    updatedBy: text('updated_by').references(() => users.id, { onDelete: 'set null' }),
    updatedAt: timestamp('updated_at', { withTimezone: true }).notNull().defaultNow(),
  },
  (t) => [primaryKey({ columns: [t.subjectId, t.name] })],
);
export type SubjectCovariate = typeof subjectCovariates.$inferSelect;

/** The study's group-test design (src/lib/schemas/cohort.ts, CohortDesignInput); `revision` for optimistic concurrency. */
export const cohortDesigns = pgTable('cohort_designs', {
  studyId: uuid('study_id')
    .primaryKey()
    .references(() => studies.id, { onDelete: 'cascade' }),
  design: jsonb('design').$type<Record<string, unknown>>().notNull(),
  revision: integer('revision').notNull().default(1),
  updatedBy: text('updated_by').references(() => users.id, { onDelete: 'set null' }),
  updatedAt: timestamp('updated_at', { withTimezone: true }).notNull().defaultNow(),
});
export type CohortDesign = typeof cohortDesigns.$inferSelect;

/**
 * What the Cohort screen paints first, per recipe version with a summary: the summary's outline (unit, bands,
 * windows, conditions, channels, channel groups) and the per-band digest (band → window → condition → normalized
 * value averaged over channels). Derived from the write-once summary, so written once, on the first Cohort view
 * that needs it; reading these instead of the summaries keeps the first paint small.
 */
export const summaryDigests = pgTable('summary_digests', {
  recipeVersionId: uuid('recipe_version_id')
    .primaryKey()
    .references(() => recipeVersions.id, { onDelete: 'cascade' }),
  outline: jsonb('outline').$type<Record<string, unknown>>().notNull(),
  digest: jsonb('digest').$type<Record<string, unknown>>().notNull(),
  createdAt: timestamp('created_at', { withTimezone: true }).notNull().defaultNow(),
});
