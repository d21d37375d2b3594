import type { AstroGlobal } from 'astro';
import { can, canSite, type Action, type SiteAction } from '../permissions';
import { getStudyForMember, getTeamForMember, type StudyWithRole, type TeamWithRole } from '../../db/queries/teams';

/** Page guards: a redirect to sign-in, a 404 for another team's rows, a 403 for a role that may not look. */
export type PageGuard<T> = { ok: true; value: T } | { ok: false; response: Response };

function signInRedirect(Astro: AstroGlobal): Response {
  return Astro.redirect(`/sign-in?next=${encodeURIComponent(Astro.url.pathname)}`);
}

function statusPage(status: number, text: string): Response {
  return new Response(
    `<!doctype html><meta charset="utf-8"><title>${status} · Tidemark</title><body style="font-family:sans-serif;background:#f5f0e6;color:#10283a;padding:3rem"><h1>${status}</h1><p>${text}</p><p><a href="/">Back to Tidemark</a></p>`,
    { status, headers: { 'content-type': 'text/html; charset=utf-8' } },
  );
}

export async function guardTeamPage(Astro: AstroGlobal, action: Action): Promise<PageGuard<TeamWithRole>> {
  const user = Astro.locals.user;
  if (!user) return { ok: false, response: signInRedirect(Astro) };
  const found = await getTeamForMember(Astro.params.teamId ?? '', user.id);
  if (!found) return { ok: false, response: statusPage(404, 'No such team, or you are not a member of it.') };
  if (!can(found.role, action)) return { ok: false, response: statusPage(403, `Your role in this team (${found.role}) does not open this page.`) };
  return { ok: true, value: found };
}

export async function guardStudyPage(Astro: AstroGlobal, action: Action): Promise<PageGuard<StudyWithRole>> {
  const user = Astro.locals.user;
  if (!user) return { ok: false, response: signInRedirect(Astro) };
  const found = await getStudyForMember(Astro.params.studyId ?? '', user.id);
  if (!found || found.team.id !== Astro.params.teamId) return { ok: false, response: statusPage(404, 'No such study in your teams.') };
  if (!can(found.role, action)) return { ok: false, response: statusPage(403, `Your role in this team (${found.role}) does not open this page.`) };
  return { ok: true, value: found };
}

/** Site administration pages: sign-in first, then the operator flag (a team role never grants these). */
export function guardSitePage(Astro: AstroGlobal, action: SiteAction): PageGuard<NonNullable<App.Locals['user']>> {
  const user = Astro.locals.user;
  if (!user) return { ok: false, response: signInRedirect(Astro) };
  if (!canSite(user, action)) return { ok: false, response: statusPage(403, 'Site administration is for operators.') };
  return { ok: true, value: user };
}

export { signInRedirect, statusPage };
