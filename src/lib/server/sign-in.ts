/**
 * Signing in, shared by the sign-in page and the workspace's sign-in-again dialog (/api/session). Rate limits per
 * account (the e-mail as typed) and per address, both in PostgreSQL; a locked account is refused before its password
 * is checked, with the same words whether or not it exists. Every failure and refusal is audited.
 */
import type { APIContext, AstroGlobal } from 'astro';
import { db } from '../../db/client';
import { recordAudit } from '../../db/queries/audit';
import { throttleClear, throttleHit, throttleWait } from '../../db/queries/throttles';
import { getUserByEmail } from '../../db/queries/users';
import { startSession } from './auth';
import { clientAddress } from './client-address';
import { burnPasswordCheck, verifyPassword } from '../crypto/password';
import { limits, waitWords } from './rate-limit';
import { invalidateSession, type ActiveSession, type SessionUser } from './sessions';

export type SignInResult =
  | { ok: true; user: SessionUser; session: ActiveSession }
  | { ok: false; status: 400 | 403 | 429; message: string; waitSeconds?: number };

const refusal = (wait: number) => ({
  ok: false as const,
  status: 429 as const,
  waitSeconds: wait,
  message: `Too many failed sign-ins. Wait ${waitWords(wait)} before trying again, or reset your password.`,
});

export async function signIn(ctx: AstroGlobal | APIContext, input: { email: string; password: string }): Promise<SignInResult> {
  const address = clientAddress(ctx.request);
  const email = input.email.trim().toLowerCase();
  const audit = (action: string, userId: string | null, detail: Record<string, unknown> = {}) =>
    recordAudit(db, { actorId: userId, action, targetTable: 'users', targetId: userId ?? `email:${email}`, detail: { address, ...detail } });

  const wait = Math.max(await throttleWait(limits.signInAccount, email), await throttleWait(limits.signInAddress, address));
  if (wait > 0) {
    const user = await getUserByEmail(email);
    await audit('session.signInRefused', user?.id ?? null, { waitSeconds: wait });
    return refusal(wait);
  }
  const user = await getUserByEmail(email);
  const ok = user?.passwordHash ? await verifyPassword(user.passwordHash, input.password) : (await burnPasswordCheck(input.password), false);
  if (!user || !ok) {
    const lockedFor = Math.max(await throttleHit(limits.signInAccount, email), await throttleHit(limits.signInAddress, address));
    await audit('session.signInFailed', user?.id ?? null, lockedFor > 0 ? { lockedSeconds: lockedFor } : {});
    if (lockedFor > 0) return refusal(lockedFor);
    return { ok: false, status: 400, message: 'That e-mail and password do not match an account.' };
  }
  if (user.disabledAt) {
    await audit('session.signInRefused', user.id, { disabled: true });
    return { ok: false, status: 403, message: 'This account is suspended. Ask your site operator.' };
  }
  await throttleClear(limits.signInAccount, email);
  // A new session id on every sign-in; the one this browser held before (if any) ends.
  if (ctx.locals.session) await invalidateSession(ctx.locals.session.id);
  const session = await startSession(ctx.cookies, ctx.url, user.id, { userAgent: ctx.request.headers.get('user-agent') ?? '', address });
  await audit('session.signIn', user.id);
  const sessionUser: SessionUser = { id: user.id, email: user.email, displayName: user.displayName, isOperator: user.isOperator };
  ctx.locals.user = sessionUser;
  ctx.locals.session = session;
  return { ok: true, user: sessionUser, session };
}
