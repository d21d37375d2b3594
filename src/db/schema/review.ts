import { sql } from 'drizzle-orm';
import { type AnyPgColumn, bigint, boolean, check, index, integer, jsonb, pgEnum, pgTable, primaryKey, text, timestamp, uniqueIndex, uuid } from 'drizzle-orm/pg-core';
import { users } from './auth';
import { analysisSessions } from './analysis';

/**
 * Team review (issue 11). Everything here is derived from a recording that never leaves the analyst's device:
 * a subject is a code the team chose, a recipe version is the analysis parameters, a summary is numbers computed in
 * the browser, notes are what people wrote. Recipe versions, summaries and signatures are written once and never
 * changed by the app (a later change makes a new version).
 */

/**
 * One saved recipe of an analysis session, numbered 1, 2, 3… per session. Never changed once written: saving again
 * makes the next number. `recipeHash` is SHA-256 over the RFC 8785 (JCS) form of `recipe`.
 */
export const recipeVersions = pgTable(
  'recipe_versions',
  {
    id: uuid('id').primaryKey().defaultRandom(),
    analysisSessionId: uuid('analysis_session_id')
      .notNull()
      .references(() => analysisSessions.id, { onDelete: 'cascade' }),
    number: integer('number').notNull(),
    recipe: jsonb('recipe').$type<Record<string, unknown>>().notNull(),
    recipeHash: text('recipe_hash').notNull(),
    createdBy: text('created_by')
      .notNull()
      .references(() => users.id, { onDelete: 'restrict' }),
    createdAt: timestamp('created_at', { withTimezone: true }).notNull().defaultNow(),
  },
  (t) => [uniqueIndex('recipe_versions_session_number_idx').on(t.analysisSessionId, t.number)],
);
export type RecipeVersion = typeof recipeVersions.$inferSelect;

/** The derived numbers of one recipe version (src/lib/schemas/review.ts, SummaryInput). One per version, written once. */
export const summaries = pgTable('summaries', {
  recipeVersionId: uuid('recipe_version_id')
    .primaryKey()
    .references(() => recipeVersions.id, { onDelete: 'cascade' }),
  summary: jsonb('summary').$type<Record<string, unknown>>().notNull(),
  summaryHash: text('summary_hash').notNull(),
  bytes: integer('bytes').notNull(),
  uploadedBy: text('uploaded_by')
    .notNull()
    .references(() => users.id, { onDelete: 'restrict' }),
  uploadedAt: timestamp('uploaded_at', { withTimezone: true }).notNull().defaultNow(),
});
export type Summary = typeof summaries.$inferSelect;

/**
 * A note on a session. A top-level note is anchored to a recipe version (with a channel or channel group, condition,
 * time range and frequency range — each optional) or, with no version, to the session as a whole. A reply has a
 * parent and no anchor of its own. `revision` counts edits for optimistic concurrency.
 */
export const notes = pgTable(
  'notes',
  {
    id: uuid('id').primaryKey().defaultRandom(),
    analysisSessionId: uuid('analysis_session_id')
      .notNull()
      .references(() => analysisSessions.id, { onDelete: 'cascade' }),
    parentId: uuid('parent_id').references((): AnyPgColumn => notes.id, { onDelete: 'cascade' }),
    recipeVersionId: uuid('recipe_version_id').references(() => recipeVersions.id, { onDelete: 'restrict' }),
    anchor: jsonb('anchor').$type<Record<string, unknown>>(),
    authorId: text('author_id')
      .notNull()
      .references(() => users.id, { onDelete: 'restrict' }),
    body: text('body').notNull(),
    mentions: text('mentions').array().notNull().default(sql`'{}'::text[]`),
    revision: integer('revision').notNull().default(1),
    /** A key the client chose for this post (a UUID), so a post sent again after a lost answer stores one note. */
    clientKey: uuid('client_key'),
    resolvedAt: timestamp('resolved_at', { withTimezone: true }),
    resolvedBy: text('resolved_by').references(() => users.id, { onDelete: 'set null' }),
    createdAt: timestamp('created_at', { withTimezone: true }).notNull().defaultNow(),
    updatedAt: timestamp('updated_at', { withTimezone: true }).notNull().defaultNow(),
  },
  (t) => [
    index('notes_session_idx').on(t.analysisSessionId),
    index('notes_parent_idx').on(t.parentId),
    uniqueIndex('notes_author_client_key_idx').on(t.authorId, t.clientKey),
  ],
);
export type Note = typeof notes.$inferSelect;

/** What a signature means, in our words: read it through, approved it (sign-off), sent it back (with a reason). */
export const signatureMeaningEnum = pgEnum('signature_meaning', ['reviewed', 'approved', 'returned']);

/**
 * A signature (after 21 CFR Part 11 §11.50: printed name, date and time, meaning; §11.70: bound to exactly what was
 * signed, here by `contentHash`). Written once; a later recipe change makes a new, unsigned version and this row
 * stays bound to the version it names.
 */
export const signatures = pgTable(
  'signatures',
  {
    id: uuid('id').primaryKey().defaultRandom(),
    analysisSessionId: uuid('analysis_session_id')
      .notNull()
      .references(() => analysisSessions.id, { onDelete: 'cascade' }),
    recipeVersionId: uuid('recipe_version_id')
      .notNull()
      .references(() => recipeVersions.id, { onDelete: 'restrict' }),
    recipeVersionNumber: integer('recipe_version_number').notNull(),
    signerId: text('signer_id')
      .notNull()
      .references(() => users.id, { onDelete: 'restrict' }),
    printedName: text('printed_name').notNull(),
    meaning: signatureMeaningEnum('meaning').notNull(),
    reason: text('reason'),
    /** SHA-256 (hex) over the JCS form of { recipe, recipeVersion, summary } — src/lib/crypto/review-hash.ts. */
    contentHash: text('content_hash').notNull(),
    signedAt: timestamp('signed_at', { withTimezone: true }).notNull().defaultNow(),
  },
  (t) => [index('signatures_session_idx').on(t.analysisSessionId)],
);
export type Signature = typeof signatures.$inferSelect;

/** Mail kinds a person can mute; a row means "do not send me this kind". */
export const mailKindEnum = pgEnum('mail_kind', ['review-requested', 'review-outcome', 'note-mention']);

export const mailMutes = pgTable(
  'mail_mutes',
  {
    userId: text('user_id')
      .notNull()
      .references(() => users.id, { onDelete: 'cascade' }),
    kind: mailKindEnum('kind').notNull(),
    createdAt: timestamp('created_at', { withTimezone: true }).notNull().defaultNow(),
  },
  (t) => [primaryKey({ columns: [t.userId, t.kind] })],
);

/**
 * Where the audit hash chain starts: events with an id up to `lastUnchainedId` were written before the chain existed
 * (no hashes) and are listed, not verified, by `npm run audit:verify`. One row, written by the migration.
 */
export const auditChainStart = pgTable(
  'audit_chain_start',
  {
    singleton: boolean('singleton').primaryKey().default(true),
    lastUnchainedId: bigint('last_unchained_id', { mode: 'number' }).notNull(),
    at: timestamp('at', { withTimezone: true }).notNull().defaultNow(),
  },
  (t) => [check('audit_chain_start_one_row', sql`${t.singleton}`)],
);
