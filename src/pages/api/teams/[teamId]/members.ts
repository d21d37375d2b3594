// A team's members (id, name, role; no e-mail addresses), for mentions in notes.
import type { APIRoute } from 'astro';
import { json, notFound, requirePermission, requireUser, route } from '../../../../lib/server/http';
import { getTeamForMember } from '../../../../db/queries/teams';
import { listMentionableMembers } from '../../../../db/queries/review';

export const GET: APIRoute = (ctx) =>
  route(ctx, async ({ locals, params }) => {
    const user = requireUser(locals);
    const found = (await getTeamForMember(params.teamId ?? '', user.id)) ?? notFound('The team');
    requirePermission(found.role, 'member:view');
    return json({ members: await listMentionableMembers(found.team.id) });
  });
