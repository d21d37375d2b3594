import { and, eq, gt, isNull } from 'drizzle-orm';
import { db } from '../client';
import { passwordResetTokens, sessions, users } from '../schema';
import { hashToken, newToken } from '../../lib/crypto/tokens';
import { hashPassword } from '../../lib/crypto/password';
import { recordAudit } from './audit';

export const RESET_LIFETIME_MINUTES = 60;

export async function createPasswordReset(userId: string, mail?: (tx: Parameters<Parameters<typeof db.transaction>[0]>[0], token: string) => Promise<void>): Promise<string> {
  const { token, tokenHash } = newToken();
  await db.transaction(async (tx) => {
    // One live reset link per person: asking again invalidates the previous one.
    await tx.delete(passwordResetTokens).where(eq(passwordResetTokens.userId, userId));
    await tx.insert(passwordResetTokens).values({ tokenHash, userId, expiresAt: new Date(Date.now() + RESET_LIFETIME_MINUTES * 60_000) });
    await recordAudit(tx, { actorId: userId, action: 'password.resetRequested', targetTable: 'users', targetId: userId });
    // The link's message is queued with the token it carries (src/lib/server/mail.ts).
    await mail?.(tx, token);
  });
  return token;
}

export type ResetLookup = { state: 'valid'; userId: string } | { state: 'expired' | 'used' | 'unknown' };

export async function lookupPasswordReset(token: string): Promise<ResetLookup> {
  const rows = await db.select().from(passwordResetTokens).where(eq(passwordResetTokens.tokenHash, hashToken(token))).limit(1);
  const row = rows[0];
  if (!row) return { state: 'unknown' };
  if (row.usedAt) return { state: 'used' };
  if (row.expiresAt.getTime() <= Date.now()) return { state: 'expired' };
  return { state: 'valid', userId: row.userId };
}

/** Sets the new password and signs the person out everywhere; null when the token is not valid any more. */
export async function completePasswordReset(token: string, password: string): Promise<string | null> {
  const passwordHash = await hashPassword(password);
  return db.transaction(async (tx) => {
    const [row] = await tx
      .update(passwordResetTokens)
      .set({ usedAt: new Date() })
      .where(and(eq(passwordResetTokens.tokenHash, hashToken(token)), isNull(passwordResetTokens.usedAt), gt(passwordResetTokens.expiresAt, new Date())))
      .returning();
    if (!row) return null;
    await tx.update(users).set({ passwordHash }).where(eq(users.id, row.userId));
    await tx.delete(sessions).where(eq(sessions.userId, row.userId));
    await recordAudit(tx, { actorId: row.userId, action: 'password.reset', targetTable: 'users', targetId: row.userId });
    return row.userId;
  });
}
