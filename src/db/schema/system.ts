import { sql } from 'drizzle-orm';
import { bigserial, index, integer, jsonb, pgTable, text, timestamp, uuid } from 'drizzle-orm/pg-core';
import { users } from './auth';

/** What the local mail fake captured, listed by the dev mailbox page. */
export const mailMessages = pgTable('mail_messages', {
  id: bigserial('id', { mode: 'number' }).primaryKey(),
  fromAddress: text('from_address').notNull(),
  toAddresses: text('to_addresses').notNull(),
  subject: text('subject').notNull(),
  textBody: text('text_body').notNull(),
  raw: text('raw').notNull(),
  receivedAt: timestamp('received_at', { withTimezone: true }).notNull().defaultNow(),
});
export type MailMessage = typeof mailMessages.$inferSelect;

/**
 * Mail waiting to be sent, and what became of it. A route writes the message here in the same transaction as the
 * change that causes it (src/lib/server/mail.ts, queueMail); the outbox sender (server/mail-sender.mjs) delivers it
 * with retries and marks it sent. The bodies are cleared once the relay has accepted the message (they may carry an
 * invitation or reset link); kind, recipient, subject and times stay as the record of what was sent.
 */
export const mailOutbox = pgTable(
  'mail_outbox',
  {
    id: bigserial('id', { mode: 'number' }).primaryKey(),
    /** invitation, team-invitation, password-reset, review-requested, review-outcome, note-mention. */
    kind: text('kind').notNull(),
    toAddress: text('to_address').notNull(),
    recipientId: text('recipient_id').references(() => users.id, { onDelete: 'set null' }),
    subject: text('subject').notNull(),
    textBody: text('text_body'),
    htmlBody: text('html_body'),
    /** The Message-ID header every attempt carries, so a receiver can recognise a repeat after a crash mid-send. */
    messageId: text('message_id').notNull().unique(),
    queuedAt: timestamp('queued_at', { withTimezone: true }).notNull().defaultNow(),
    attempts: integer('attempts').notNull().default(0),
    nextAttemptAt: timestamp('next_attempt_at', { withTimezone: true }).notNull().defaultNow(),
    /** Set while a sender holds the message; another sender takes it only after this time (a sender that died). */
    claimedUntil: timestamp('claimed_until', { withTimezone: true }),
    lastError: text('last_error'),
    sentAt: timestamp('sent_at', { withTimezone: true }),
    /** The relay refused the message for good (an SMTP 5xx answer): not retried. */
    failedAt: timestamp('failed_at', { withTimezone: true }),
  },
  (t) => [index('mail_outbox_due_idx').on(t.nextAttemptAt).where(sql`sent_at IS NULL AND failed_at IS NULL`)],
);
export type MailOutboxRow = typeof mailOutbox.$inferSelect;

/**
 * Who did what, when, to which row. Append-only (the app's role may only SELECT and INSERT). Each event holds the
 * SHA-256 of the previous event of the same team (`prevHash`; site events without a team form their own chain) and
 * its own (`hash`), computed by recordAudit (src/db/queries/audit.ts) and checked by `npm run audit:verify`.
 */
export const auditEvents = pgTable(
  'audit_events',
  {
    id: bigserial('id', { mode: 'number' }).primaryKey(),
    actorId: text('actor_id').references(() => users.id, { onDelete: 'set null' }),
    action: text('action').notNull(),
    targetTable: text('target_table').notNull(),
    targetId: text('target_id').notNull(),
    teamId: uuid('team_id'),
    detail: jsonb('detail').$type<Record<string, unknown>>().notNull().default({}),
    at: timestamp('at', { withTimezone: true }).notNull().defaultNow(),
    /** The previous event's `hash` in this team's chain; 64 zeros for a chain's first event; null before the chain. */
    prevHash: text('prev_hash'),
    /** SHA-256 (hex) over the RFC 8785 form of this event (src/lib/crypto/audit-chain.ts); null before the chain. */
    hash: text('hash'),
  },
  (t) => [
    index('audit_events_target_idx').on(t.targetTable, t.targetId),
    index('audit_events_at_idx').on(t.at),
    index('audit_events_team_id_idx').on(t.teamId, t.id),
  ],
);
export type AuditEvent = typeof auditEvents.$inferSelect;
