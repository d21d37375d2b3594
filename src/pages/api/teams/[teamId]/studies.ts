import type { APIRoute } from 'astro';
import { json, notFound, parseJson, requirePermission, requireUser, route } from '../../../../lib/server/http';
import { createStudy, getTeamForMember, listStudies } from '../../../../db/queries/teams';
import { StudyInput } from '../../../../lib/schemas/studies';

export const GET: APIRoute = (ctx) =>
  route(ctx, async ({ locals, params }) => {
    const user = requireUser(locals);
    const found = (await getTeamForMember(params.teamId!, user.id)) ?? notFound('The team');
    requirePermission(found.role, 'study:view');
    return json({ studies: await listStudies(found.team.id) });
  });

export const POST: APIRoute = (ctx) =>
  route(ctx, async ({ locals, params, request }) => {
    const user = requireUser(locals);
    const found = (await getTeamForMember(params.teamId!, user.id)) ?? notFound('The team');
    requirePermission(found.role, 'study:create');
    const input = await parseJson(request, StudyInput, { maxBytes: 8192 });
    return json({ study: await createStudy(found.team.id, user.id, input) }, 201);
  });
