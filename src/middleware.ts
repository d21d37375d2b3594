import { defineMiddleware } from 'astro:middleware';
import type { APIContext, MiddlewareNext } from 'astro';
import { blankSessionCookie, SESSION_COOKIE, writeSessionCookie } from './lib/server/auth';
import { validateSessionToken } from './lib/server/sessions';
import { withSecurityHeaders } from './lib/server/security-headers';
import { crossSiteRefusal } from './lib/server/same-origin';
import { databaseUnavailable } from './lib/server/unavailable';
import { isDatabaseUnavailable } from './db/client';

/** The workspace's expiry prompt asks here how long its session has left; asking is not activity. */
const STATUS_PATH = '/api/session';

export const onRequest = defineMiddleware(async (context, next) => {
  try {
    return await handle(context, next);
  } catch (error) {
    if (!isDatabaseUnavailable(error)) throw error;
    console.error(`[tidemark] ${context.request.method} ${context.url.pathname}: database unavailable`);
    return withSecurityHeaders(databaseUnavailable(context.url));
  }
});

async function handle(context: APIContext, next: MiddlewareNext): Promise<Response> {
  context.locals.user = null;
  context.locals.session = null;
  const crossSite = crossSiteRefusal(context.request, context.url.origin);
  if (crossSite) {
    return withSecurityHeaders(
      new Response(`Cross-site request refused: ${crossSite}. Nothing was changed.`, { status: 403, headers: { 'content-type': 'text/plain; charset=utf-8' } }),
    );
  }
  const token = context.cookies.get(SESSION_COOKIE)?.value ?? null;
  if (token) {
    const touch = !(context.request.method === 'GET' && context.url.pathname === STATUS_PATH);
    const found = await validateSessionToken(token, { touch });
    if (found.state === 'valid') {
      context.locals.user = found.user;
      context.locals.session = found.session;
      if (found.rotatedToken) writeSessionCookie(context.cookies, context.url, found.rotatedToken);
    } else {
      if (found.state === 'ended') context.locals.sessionEnded = found.why;
      blankSessionCookie(context.cookies, context.url);
    }
  }
  const response = await next();
  // Pages for signed-in people are private and change as data changes.
  if (context.locals.user && !response.headers.has('cache-control')) {
    try {
      response.headers.set('cache-control', 'private, no-store');
    } catch {
      /* immutable headers: withSecurityHeaders copies them */
    }
  }
  return withSecurityHeaders(response);
}
