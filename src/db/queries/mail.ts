import { desc } from 'drizzle-orm';
import { db } from '../client';
import { mailMessages, type MailMessage } from '../schema';

export async function listMailMessages(limit = 100): Promise<MailMessage[]> {
  return db.select().from(mailMessages).orderBy(desc(mailMessages.id)).limit(limit);
}
