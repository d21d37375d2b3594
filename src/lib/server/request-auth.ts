/**
 * Who is asking: the sign-in check of every request (src/middleware.ts), and its shortcut for the busiest routes
 * (issue 17). The check (validateSessionToken) is one round trip to PostgreSQL before the route makes its own. The
 * routes in SELF_CHECKING_ROUTES instead put the check into their own statement: `PLAIN_SIGN_IN` finds the session
 * only when the full check would find it valid and write nothing (not ended, not due for a new id, used within the
 * last minute), so such a statement can vouch for the reader. When it finds nothing, the route runs the full check
 * (`checkDeferredSignIn`) and then its ordinary statement: a session that ended, needs its idle clock restarted or a
 * new id gets exactly what every other route gives it.
 */
import type { APIContext } from 'astro';
import { blankSessionCookie, SESSION_COOKIE, writeSessionCookie } from './auth';
import { requireUser } from './http';
import { sessionIdOf, validateSessionToken, type ActiveSession, type SessionUser } from './sessions';
import { settings } from './settings';
import type { PlainSignInRow, Reader } from '../../db/queries/readers';

/** The workspace's expiry prompt asks here how long its session has left; asking is not activity. */
const STATUS_PATH = '/api/session';

/** `METHOD routePattern` of the routes that check the sign-in inside their own statement. */
// Each of these routes checks the sign-in before it answers or changes anything: through `readAsSignedIn`, or (the
// note post) in the statement that stores the note and then through loadSession in review-api.ts. Reading the
// request's body first is fine; refusing it must wait for the check.
// Astro gives `routePattern` in lower case ("[sessionid]"), so the keys are compared in lower case.
const SELF_CHECKING_ROUTES = new Set(['GET /api/analysis-sessions/[sessionId]', 'GET /api/studies/[studyId]/cohort', 'POST /api/analysis-sessions/[sessionId]/notes'].map((k) => k.toLowerCase()));

const deferredTokens = new WeakMap<App.Locals, string>();

/** The middleware's part: checks the sign-in now, or leaves it to a self-checking route. */
export async function checkSignIn(context: APIContext): Promise<void> {
  const token = context.cookies.get(SESSION_COOKIE)?.value ?? null;
  if (!token) return;
  if (SELF_CHECKING_ROUTES.has(`${context.request.method} ${context.routePattern}`.toLowerCase())) {
    deferredTokens.set(context.locals, token);
    return;
  }
  await fullCheck(context, token);
}

async function fullCheck(context: APIContext, token: string): Promise<void> {
  context.locals.signInCheck = 'full';
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

/** The token a self-checking route is to check (null: no cookie, or the middleware checked it already). */
export function deferredSignIn(context: APIContext): { tokenHash: string; idleMinutes: number } | null {
  const token = deferredTokens.get(context.locals);
  return token === undefined ? null : { tokenHash: sessionIdOf(token), idleMinutes: settings.sessionIdleMinutes };
}

/** Records the reader a self-checking statement vouched for, as the full check would have. */
export function adoptSignIn(context: APIContext, row: PlainSignInRow): void {
  const token = deferredTokens.get(context.locals)!;
  deferredTokens.delete(context.locals);
  const user: SessionUser = { id: row.user_id, email: row.email, displayName: row.display_name, isOperator: row.is_operator };
  const idle = new Date(row.last_used_at.getTime() + settings.sessionIdleMinutes * 60_000);
  const session: ActiveSession = {
    id: sessionIdOf(token), userId: row.user_id, createdAt: row.session_created_at, lastUsedAt: row.last_used_at, expiresAt: row.expires_at,
    idleExpiresAt: idle < row.expires_at ? idle : row.expires_at,
  };
  context.locals.user = user;
  context.locals.session = session;
  context.locals.signInCheck = 'statement';
}

/** The full check, when the route's own statement could not vouch for the reader (or there was no cookie). */
export async function checkDeferredSignIn(context: APIContext): Promise<void> {
  const token = deferredTokens.get(context.locals);
  if (token === undefined) return;
  deferredTokens.delete(context.locals);
  await fullCheck(context, token);
}

/**
 * A self-checking route's read: first with the sign-in checked inside `read`'s statement; when that finds nothing
 * (a session to end, restart or renew, no such row, or not a member), the full check and then `read` for the user
 * it found (401 when nobody is signed in). `read` returns the row with the `plainSignIn` columns when it read for a
 * sign-in.
 */
export async function readAsSignedIn<T>(context: APIContext, read: (reader: Reader) => Promise<{ row: T; signIn: PlainSignInRow | null } | null>): Promise<T | null> {
  const deferred = deferredSignIn(context);
  if (deferred) {
    const found = await read(deferred);
    if (found?.signIn) {
      adoptSignIn(context, found.signIn);
      return found.row;
    }
    await checkDeferredSignIn(context);
  }
  const user = requireUser(context.locals);
  return (await read({ userId: user.id }))?.row ?? null;
}
