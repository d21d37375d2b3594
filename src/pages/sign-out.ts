import type { APIRoute } from 'astro';
import { blankSessionCookie, lucia } from '../lib/server/auth';

export const POST: APIRoute = async ({ locals, cookies, url, redirect }) => {
  if (locals.session) await lucia.invalidateSession(locals.session.id);
  blankSessionCookie(cookies, url);
  return redirect('/sign-in?notice=signed-out', 303);
};
