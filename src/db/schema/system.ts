import { bigserial, index, jsonb, pgTable, text, timestamp, uuid } from 'drizzle-orm/pg-core';
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
