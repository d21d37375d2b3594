/** The body of GET /api/session and POST /api/session/keep: how long the current session has left, or why it ended. */
import type { APIContext } from 'astro';
import { json } from './http';
import { sessionTimes } from './sessions';
import { settings } from './settings';

type Reason = 'idle' | 'absolute' | 'disabled' | 'none';
const endedWords: Record<Reason, string> = {
  idle: `You were signed out after ${settings.sessionIdleMinutes} minutes without activity.`,
  absolute: `Your sign-in reached its time limit (${settings.sessionAbsoluteMinutes / 60} hours after signing in).`,
  disabled: 'This account is suspended. Ask your site operator.',
  none: 'You are not signed in (the session has ended).',
};

function ended(reason: Reason): Response {
  return json({ error: { code: 'session_ended', reason, message: endedWords[reason] }, idleMinutes: settings.sessionIdleMinutes, absoluteMinutes: settings.sessionAbsoluteMinutes }, 401);
}

/** The status body for a live session, or the 401 when it has none. */
export async function sessionStatus(ctx: APIContext): Promise<Response> {
  const { user, session } = ctx.locals;
  if (!user || !session) return ended(ctx.locals.sessionEnded ?? 'none');
  const times = await sessionTimes(session.id);
  if (!times) return ended('none');
  return json({
    user: { id: user.id, email: user.email, displayName: user.displayName },
    ...times,
    idleMinutes: settings.sessionIdleMinutes,
    absoluteMinutes: settings.sessionAbsoluteMinutes,
  });
}

