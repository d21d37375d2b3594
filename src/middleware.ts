import { defineMiddleware } from 'astro:middleware';
import { blankSessionCookie, lucia, refreshSessionCookie } from './lib/server/auth';

// Lucia v3's Astro pattern: read the cookie, validate, refresh when fresh, blank when invalid.
export const onRequest = defineMiddleware(async (context, next) => {
  const sessionId = context.cookies.get(lucia.sessionCookieName)?.value ?? null;
  if (!sessionId) {
    context.locals.user = null;
    context.locals.session = null;
    return next();
  }
  const { session, user } = await lucia.validateSession(sessionId);
  if (session && session.fresh) refreshSessionCookie(context.cookies, context.url, session.id);
  if (!session) blankSessionCookie(context.cookies, context.url);
  context.locals.session = session;
  context.locals.user = user;
  const response = await next();
  // Pages for signed-in people are private and change as data changes.
  if (user && !response.headers.has('cache-control')) response.headers.set('cache-control', 'private, no-store');
  return response;
});
