/**
 * Sign-in sessions, after the pattern the Lucia project recommends in place of its v3 library (lucia-auth.com,
 * "Basic session API"): a random token in an HttpOnly cookie, only its SHA-256 in the database. Two limits: idle
 * (no request for `sessionIdleMinutes`) and absolute (`sessionAbsoluteMinutes` after sign-in, never extended).
 * Every time comparison uses the database's clock, so tests move time by moving the stored timestamps.
 */
import { createHash, randomBytes } from 'node:crypto';
import { and, eq, ne, sql } from 'drizzle-orm';
import { db } from '../../db/client';
import { sessions, users } from '../../db/schema';
import { settings } from './settings';

export interface SessionUser {
  id: string;
  email: string;
  displayName: string;
  isOperator: boolean;
}

export interface ActiveSession {
  /** SHA-256 of the cookie's token (what the table stores). */
  id: string;
  userId: string;
  createdAt: Date;
  lastUsedAt: Date;
  /** When the absolute limit ends it. */
  expiresAt: Date;
  /** When the idle limit ends it if no request comes before. */
  idleExpiresAt: Date;
}

export function newSessionToken(): string {
  return randomBytes(24).toString('base64url');
}

export function sessionIdOf(token: string): string {
  return createHash('sha256').update(token).digest('hex');
}

/** Creates a session for `userId`; returns the cookie token (never stored). */
export async function createSession(userId: string, meta: { userAgent: string; address: string }): Promise<{ token: string; session: ActiveSession }> {
  const token = newSessionToken();
  const id = sessionIdOf(token);
  const [row] = await db
    .insert(sessions)
    .values({
      id,
      userId,
      userAgent: meta.userAgent.slice(0, 400),
      address: meta.address.slice(0, 64),
      expiresAt: sql`now() + make_interval(mins => ${settings.sessionAbsoluteMinutes})`,
    })
    .returning();
  return { token, session: toActive(row) };
}

function toActive(row: typeof sessions.$inferSelect): ActiveSession {
  const idle = new Date(row.lastUsedAt.getTime() + settings.sessionIdleMinutes * 60_000);
  return { id: row.id, userId: row.userId, createdAt: row.createdAt, lastUsedAt: row.lastUsedAt, expiresAt: row.expiresAt, idleExpiresAt: idle < row.expiresAt ? idle : row.expiresAt };
}

/**
 * Every request's first query, prepared once (drizzle `.prepare`, a named statement per connection): neither the SQL
 * text nor PostgreSQL's plan is made again per request.
 */
const sessionLookup = db
  .select({
    session: sessions,
    user: { id: users.id, email: users.email, displayName: users.displayName, isOperator: users.isOperator, disabledAt: users.disabledAt },
    idleOver: sql<boolean>`${sessions.lastUsedAt} <= now() - make_interval(mins => ${sql.placeholder('idleMinutes')})`,
    absoluteOver: sql<boolean>`${sessions.expiresAt} <= now()`,
    stale: sql<boolean>`${sessions.lastUsedAt} <= now() - interval '1 minute'`,
  })
  .from(sessions)
  .innerJoin(users, eq(users.id, sessions.userId))
  .where(eq(sessions.id, sql.placeholder('id')))
  .limit(1)
  .prepare('tidemark_session_lookup');

export type Validation =
  | { state: 'none' }
  | { state: 'ended'; why: 'idle' | 'absolute' | 'disabled' }
  | { state: 'valid'; session: ActiveSession; user: SessionUser; rotatedToken?: string };

/**
 * Looks a cookie token up. An expired session is deleted and reported as ended. `touch` records the request as
 * activity (the idle clock restarts; written at most once a minute); a status poll passes `touch: false`. A
 * session marked for rotation (its person's roles changed) is replaced by a new id with the same limits.
 */
export async function validateSessionToken(token: string, { touch = true } = {}): Promise<Validation> {
  const id = sessionIdOf(token);
  const rows = await sessionLookup.execute({ id, idleMinutes: settings.sessionIdleMinutes });
  const row = rows[0];
  if (!row) return { state: 'none' };
  const why = row.user.disabledAt ? 'disabled' : row.absoluteOver ? 'absolute' : row.idleOver ? 'idle' : null;
  if (why) {
    await db.delete(sessions).where(eq(sessions.id, id));
    return { state: 'ended', why };
  }
  const user: SessionUser = { id: row.user.id, email: row.user.email, displayName: row.user.displayName, isOperator: row.user.isOperator };
  if (row.session.rotationDue) {
    const rotatedToken = newSessionToken();
    const newId = sessionIdOf(rotatedToken);
    const [fresh] = await db
      .update(sessions)
      .set({ id: newId, rotationDue: false, ...(touch ? { lastUsedAt: sql`now()` } : {}) })
      .where(eq(sessions.id, id))
      .returning();
    return { state: 'valid', session: toActive(fresh), user, rotatedToken };
  }
  if (touch && row.stale) {
    const [fresh] = await db.update(sessions).set({ lastUsedAt: sql`now()` }).where(eq(sessions.id, id)).returning();
    return { state: 'valid', session: toActive(fresh), user };
  }
  return { state: 'valid', session: toActive(row.session), user };
}

export async function invalidateSession(id: string): Promise<void> {
  await db.delete(sessions).where(eq(sessions.id, id));
}

/** Ends every session of `userId` but `keepId` (when given); returns how many ended. */
export async function invalidateUserSessions(userId: string, keepId?: string): Promise<number> {
  const ended = await db
    .delete(sessions)
    .where(keepId ? and(eq(sessions.userId, userId), ne(sessions.id, keepId)) : eq(sessions.userId, userId))
    .returning({ id: sessions.id });
  return ended.length;
}

/** Marks every session of `userId` for a new id on its next request (after a role change). */
export async function markSessionsForRotation(userId: string): Promise<void> {
  await db.update(sessions).set({ rotationDue: true }).where(eq(sessions.userId, userId));
}

export type ListedSession = ActiveSession & { userAgent: string; address: string };

export async function listUserSessions(userId: string): Promise<ListedSession[]> {
  const rows = await db.select().from(sessions).where(eq(sessions.userId, userId)).orderBy(sql`${sessions.lastUsedAt} desc`);
  return rows.map((r) => ({ ...toActive(r), userAgent: r.userAgent, address: r.address }));
}

export interface SessionTimes {
  /** Seconds until the idle limit ends the session if no request comes before (database clock). */
  idleSecondsLeft: number;
  /** Seconds until the absolute limit ends it, whatever happens. */
  absoluteSecondsLeft: number;
  /** The same two moments as ISO times (the database's clock). */
  idleExpiresAt: string;
  expiresAt: string;
}

/** How long session `id` has left, counted on the database's clock; null when it does not exist. */
export async function sessionTimes(id: string): Promise<SessionTimes | null> {
  const rows = await db
    .select({
      idle: sql<number>`floor(extract(epoch from ${sessions.lastUsedAt} + make_interval(mins => ${settings.sessionIdleMinutes}) - now()))::int`,
      absolute: sql<number>`floor(extract(epoch from ${sessions.expiresAt} - now()))::int`,
      idleAtMs: sql<string>`floor(extract(epoch from least(${sessions.lastUsedAt} + make_interval(mins => ${settings.sessionIdleMinutes}), ${sessions.expiresAt})) * 1000)::float8`,
      absoluteAt: sessions.expiresAt,
    })
    .from(sessions)
    .where(eq(sessions.id, id))
    .limit(1);
  const row = rows[0];
  if (!row) return null;
  return {
    idleSecondsLeft: Math.max(0, Math.min(row.idle, row.absolute)),
    absoluteSecondsLeft: Math.max(0, row.absolute),
    idleExpiresAt: new Date(Number(row.idleAtMs)).toISOString(),
    expiresAt: row.absoluteAt.toISOString(),
  };
}
