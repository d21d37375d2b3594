import { defineMiddleware } from 'astro:middleware';
import type { APIContext, MiddlewareNext } from 'astro';
import { checkSignIn } from './lib/server/request-auth';
import { withSecurityHeaders } from './lib/server/security-headers';
import { crossSiteRefusal } from './lib/server/same-origin';
import { databaseUnavailable } from './lib/server/unavailable';
import { isDatabaseUnavailable } from './db/client';

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
  // The busiest routes check the sign-in inside their own statement (lib/server/request-auth.ts).
  await checkSignIn(context);
  const response = await next();
  // Test and demo builds say how the sign-in was checked, so tests can tell the shortcut ran (request-auth.ts).
  if (import.meta.env.TIDEMARK_DEMO && context.locals.signInCheck) {
    try {
      response.headers.set('x-tidemark-sign-in-check', context.locals.signInCheck);
    } catch {
      /* immutable headers */
    }
  }
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
