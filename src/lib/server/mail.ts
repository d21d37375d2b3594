/**
 * Mail leaves through the outbox (issue 17): a route writes each message into `mail_outbox` in the same transaction
 * as the change that causes it, so the message exists exactly when the change does, and a crash or a stop never loses
 * it. The outbox sender in the server process (server/mail-sender.mjs) delivers it, retries with a growing wait while
 * the relay cannot be reached, and marks it sent. Nothing here talks SMTP.
 */
import { randomUUID } from 'node:crypto';
import type { Db, Tx } from '../../db/client';
import { mailOutbox } from '../../db/schema';

/** true when mail goes to the local fake (the dev mailbox page is shown only then). */
export function mailFakeActive(): boolean {
  return import.meta.env.TIDEMARK_DEMO === true && process.env.TIDEMARK_MAIL_FAKE === '1';
}

/** The public origin used in mailed links: TIDEMARK_ORIGIN when set, else the origin of the request. */
export function publicOrigin(url: URL): string {
  return process.env.TIDEMARK_ORIGIN ?? url.origin;
}

export type OutboxKind = 'invitation' | 'team-invitation' | 'password-reset' | 'review-requested' | 'review-outcome' | 'note-mention';

export interface OutgoingMail {
  kind: OutboxKind;
  to: string;
  /** The account the message is for, when there is one (null for an invitation to a new address). */
  recipientId?: string | null;
  subject: string;
  /** The plain-text part; `html` adds an HTML alternative. */
  text: string;
  html?: string;
}

/**
 * Queues one message in the caller's transaction (it is stored, or not, with the change that causes it). Call
 * `wakeMailSender()` after the transaction commits so it goes out at once rather than at the sender's next look.
 */
export async function queueMail(tx: Tx | Db, mail: OutgoingMail): Promise<void> {
  await tx.insert(mailOutbox).values({
    kind: mail.kind,
    toAddress: mail.to,
    recipientId: mail.recipientId ?? null,
    subject: mail.subject,
    textBody: mail.text,
    htmlBody: mail.html ?? null,
    messageId: `<${randomUUID()}@outbox.tidemark.invalid>`,
  });
}

/** Tells the outbox sender of this process (when it runs one) that new mail is waiting. */
export function wakeMailSender(): void {
  (globalThis as { tidemarkWakeMailSender?: () => void }).tidemarkWakeMailSender?.();
}
