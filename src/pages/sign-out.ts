import type { APIRoute } from 'astro';
import { blankSessionCookie } from '../lib/server/auth';
import { invalidateSession } from '../lib/server/sessions';

export const POST: APIRoute = async ({ locals, cookies, url, redirect }) => {
  if (locals.session) await invalidateSession(locals.session.id);
  blankSessionCookie(cookies, url);
  return redirect('/sign-in?notice=signed-out', 303);
};
