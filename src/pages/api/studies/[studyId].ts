import type { APIRoute } from 'astro';
import { json, notFound, requirePermission, requireUser, route } from '../../../lib/server/http';
import { getStudyForMember } from '../../../db/queries/teams';

export const GET: APIRoute = (ctx) =>
  route(ctx, async ({ locals, params }) => {
    const user = requireUser(locals);
    const found = (await getStudyForMember(params.studyId!, user.id)) ?? notFound('The study');
    requirePermission(found.role, 'study:view');
    return json({ study: found.study, team: { id: found.team.id, name: found.team.name }, role: found.role });
  });
