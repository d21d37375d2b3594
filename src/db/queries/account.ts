/**
 * A person's own account: changing the password and ending their own sessions. Each change and its audit event share
 * one transaction (DEVELOPERS.md, "Adding things").
 */
import { and, eq, ne, sql } from 'drizzle-orm';
import { db } from '../client';
import { sessions, users } from '../schema';
import { recordAudit } from './audit';

/**
 * Sets a new password hash, ends every other session of the account and gives the current one a new id
 * (`newCurrentId`, the SHA-256 of the new cookie token). Returns how many other sessions ended, or null when the
 * current session no longer exists (it ended meanwhile: nothing is changed).
 */
export async function changePassword(
  userId: string,
  passwordHash: string,
  current: { id: string; newId: string },
  address: string,
): Promise<{ endedOthers: number } | null> {
  return db.transaction(async (tx) => {
    const [moved] = await tx
      .update(sessions)
      .set({ id: current.newId, lastUsedAt: sql`now()`, rotationDue: false })
      .where(and(eq(sessions.id, current.id), eq(sessions.userId, userId)))
      .returning({ id: sessions.id });
    if (!moved) return null;
    await tx.update(users).set({ passwordHash }).where(eq(users.id, userId));
    const ended = await tx.delete(sessions).where(and(eq(sessions.userId, userId), ne(sessions.id, current.newId))).returning({ id: sessions.id });
    await recordAudit(tx, { actorId: userId, action: 'password.change', targetTable: 'users', targetId: userId, detail: { address, endedSessions: ended.length } });
    return { endedOthers: ended.length };
  });
}

/** "Sign out everywhere else": ends every session of `userId` but `keepId`; returns how many ended. */
export async function endOtherSessions(userId: string, keepId: string, address: string): Promise<number> {
  return db.transaction(async (tx) => {
    const ended = await tx.delete(sessions).where(and(eq(sessions.userId, userId), ne(sessions.id, keepId))).returning({ id: sessions.id });
    await recordAudit(tx, { actorId: userId, action: 'session.endOthers', targetTable: 'users', targetId: userId, detail: { address, endedSessions: ended.length } });
    return ended.length;
  });
}

/**
 * Ends one session of `userId` (never another person's: the id must belong to them); false when there is no such
 * session. The audit names the session by the first 12 hex digits of its stored digest.
 */
export async function endOneSession(userId: string, sessionId: string, address: string): Promise<boolean> {
  return db.transaction(async (tx) => {
    const ended = await tx.delete(sessions).where(and(eq(sessions.userId, userId), eq(sessions.id, sessionId))).returning({ id: sessions.id });
    if (ended.length === 0) return false;
    await recordAudit(tx, { actorId: userId, action: 'session.end', targetTable: 'sessions', targetId: sessionId.slice(0, 12), detail: { address } });
    return true;
  });
}
