import { boolean, index, integer, pgTable, text, timestamp, uniqueIndex } from 'drizzle-orm/pg-core';
import { sql } from 'drizzle-orm';

export const users = pgTable(
  'users',
  {
    id: text('id').primaryKey(),
    email: text('email').notNull(),
    displayName: text('display_name').notNull(),
    /** null until the invited person sets a password. argon2id PHC string. */
    passwordHash: text('password_hash'),
    /** Site administration (people, teams, the site audit). Not a team role: an operator sees no team's studies unless also a member. */
    isOperator: boolean('is_operator').notNull().default(false),
    /** Set when an operator suspends the account: no sign-in, every session ended. */
    disabledAt: timestamp('disabled_at', { withTimezone: true }),
    createdAt: timestamp('created_at', { withTimezone: true }).notNull().defaultNow(),
  },
  (t) => [uniqueIndex('users_email_lower_idx').on(sql`lower(${t.email})`)],
);
export type User = typeof users.$inferSelect;

/**
 * Sign-in sessions. Not to be confused with analysis sessions. `id` is the SHA-256 (hex) of the token in the
 * cookie; the token itself is never stored, so a copy of this table signs nobody in.
 */
export const sessions = pgTable(
  'sessions',
  {
    id: text('id').primaryKey(),
    userId: text('user_id')
      .notNull()
      .references(() => users.id, { onDelete: 'cascade' }),
    createdAt: timestamp('created_at', { withTimezone: true }).notNull().defaultNow(),
    lastUsedAt: timestamp('last_used_at', { withTimezone: true }).notNull().defaultNow(),
    /** The absolute limit: created_at + the absolute lifetime. The idle limit is counted from last_used_at. */
    expiresAt: timestamp('expires_at', { withTimezone: true, mode: 'date' }).notNull(),
    userAgent: text('user_agent').notNull().default(''),
    address: text('address').notNull().default(''),
    /** Set when the person's roles change: the next request swaps this session for a new id. */
    rotationDue: boolean('rotation_due').notNull().default(false),
  },
  (t) => [index('sessions_user_idx').on(t.userId)],
);
export type Session = typeof sessions.$inferSelect;

export const passwordResetTokens = pgTable('password_reset_tokens', {
  /** SHA-256 of the token sent by mail; the token itself is never stored. */
  tokenHash: text('token_hash').primaryKey(),
  userId: text('user_id')
    .notNull()
    .references(() => users.id, { onDelete: 'cascade' }),
  expiresAt: timestamp('expires_at', { withTimezone: true }).notNull(),
  usedAt: timestamp('used_at', { withTimezone: true }),
  createdAt: timestamp('created_at', { withTimezone: true }).notNull().defaultNow(),
});
export type PasswordResetToken = typeof passwordResetTokens.$inferSelect;

/**
 * Attempt counters for rate limits, kept in PostgreSQL so they hold across restarts and processes. One row per
 * (bucket, subject): a fixed window of `count` attempts since `window_started_at`, and a lock once the bucket's
 * allowance is used up. `subject` is a SHA-256 of the e-mail, address or token, never the value itself.
 */
export const throttles = pgTable(
  'throttles',
  {
    bucket: text('bucket').notNull(),
    subject: text('subject').notNull(),
    windowStartedAt: timestamp('window_started_at', { withTimezone: true }).notNull().defaultNow(),
    count: integer('count').notNull().default(0),
    lockedUntil: timestamp('locked_until', { withTimezone: true }),
  },
  (t) => [uniqueIndex('throttles_bucket_subject_idx').on(t.bucket, t.subject)],
);
