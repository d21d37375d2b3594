import type { AstroCookies } from 'astro';
import { cookieIsSecure } from './cookies';
import { createSession, type ActiveSession } from './sessions';

export const SESSION_COOKIE = 'tidemark_session';

/**
 * The cookie carries no Max-Age: it lives as long as the browser session at most, and the server's idle and absolute
 * limits decide validity. HttpOnly, SameSite=Lax, Secure off loopback (see cookies.ts).
 */
export function writeSessionCookie(cookies: AstroCookies, url: URL, token: string): void {
  cookies.set(SESSION_COOKIE, token, { path: '/', httpOnly: true, sameSite: 'lax', secure: cookieIsSecure(url) });
}

export function blankSessionCookie(cookies: AstroCookies, url: URL): void {
  cookies.set(SESSION_COOKIE, '', { path: '/', httpOnly: true, sameSite: 'lax', secure: cookieIsSecure(url), maxAge: 0 });
}

/**
 * Signs `userId` in with a new session id (rotation on sign-in: any session the browser held before is ended by the
 * caller through `previous`). Returns the new session.
 */
export async function startSession(
  cookies: AstroCookies,
  url: URL,
  userId: string,
  meta: { userAgent: string; address: string },
): Promise<ActiveSession> {
  const { token, session } = await createSession(userId, meta);
  writeSessionCookie(cookies, url, token);
  return session;
}
