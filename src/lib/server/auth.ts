import { Lucia, TimeSpan, generateIdFromEntropySize } from 'lucia';
import { DrizzlePostgreSQLAdapter } from '@lucia-auth/adapter-drizzle';
import type { AstroCookies } from 'astro';
import { db } from '../../db/client';
import { sessions, users } from '../../db/schema';
import { cookieIsSecure } from './cookies';

const adapter = new DrizzlePostgreSQLAdapter(db, sessions, users);

export const SESSION_LIFETIME_DAYS = 14;

export const lucia = new Lucia(adapter, {
  sessionExpiresIn: new TimeSpan(SESSION_LIFETIME_DAYS, 'd'),
  sessionCookie: {
    name: 'tidemark_session',
    attributes: { sameSite: 'lax' },
  },
  getUserAttributes: (attributes) => ({ email: attributes.email, displayName: attributes.displayName }),
});

declare module 'lucia' {
  interface Register {
    Lucia: typeof lucia;
    DatabaseUserAttributes: { email: string; displayName: string };
  }
}


function writeCookie(cookies: AstroCookies, url: URL, cookie: ReturnType<typeof lucia.createBlankSessionCookie>) {
  cookies.set(cookie.name, cookie.value, { ...cookie.attributes, httpOnly: true, sameSite: 'lax', secure: cookieIsSecure(url) });
}

export async function startSession(cookies: AstroCookies, url: URL, userId: string): Promise<void> {
  const session = await lucia.createSession(userId, {});
  writeCookie(cookies, url, lucia.createSessionCookie(session.id));
}

export function refreshSessionCookie(cookies: AstroCookies, url: URL, sessionId: string): void {
  writeCookie(cookies, url, lucia.createSessionCookie(sessionId));
}

export function blankSessionCookie(cookies: AstroCookies, url: URL): void {
  writeCookie(cookies, url, lucia.createBlankSessionCookie());
}

export function newUserId(): string {
  return generateIdFromEntropySize(10);
}
