/**
 * The sign-in session of the cookie this request carries, for the workspace's expiry prompt.
 * GET: how long it has left (idle and absolute limits, database clock). Asking is not activity: the middleware leaves
 * the idle clock alone for GET /api/session. 401 with `reason` ('idle' | 'absolute' | 'disabled' | 'none') when
 * there is no live session.
 * POST {email, password, expectedUserId?}: signs in again through signIn() (the sign-in page's throttles and audit).
 * With `expectedUserId` (the person whose work the open workspace holds) another account is refused before any
 * password is checked.
 */
import type { APIRoute } from 'astro';
import { json, parseJson, route } from '../../../lib/server/http';
import { SessionSignInInput } from '../../../lib/schemas/auth';
import { sessionStatus } from '../../../lib/server/session-status';
import { signIn } from '../../../lib/server/sign-in';
import { getUserByEmail } from '../../../db/queries/users';

export const GET: APIRoute = (ctx) => route(ctx, sessionStatus);

export const POST: APIRoute = (ctx) =>
  route(ctx, async (ctx) => {
    const input = await parseJson(ctx.request, SessionSignInInput, { maxBytes: 4096 });
    if (input.expectedUserId) {
      const account = await getUserByEmail(input.email);
      if (account?.id !== input.expectedUserId) {
        return json({ error: { code: 'other_account', message: 'This workspace holds the work of the person who opened it: sign in with that account to carry on. To work as someone else, reload the page (the open recording and results are then closed).' } }, 403);
      }
    }
    const result = await signIn(ctx, { email: input.email, password: input.password });
    if (!result.ok) {
      const code = result.status === 429 ? 'rate_limited' : result.status === 403 ? 'suspended' : 'wrong_credentials';
      return json({ error: { code, message: result.message, ...(result.waitSeconds ? { waitSeconds: result.waitSeconds } : {}) } }, result.status);
    }
    return sessionStatus(ctx);
  });
