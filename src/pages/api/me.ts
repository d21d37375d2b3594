// The signed-in person's own account and memberships: no team's rows, so sign-in is the only check.
import type { APIRoute } from 'astro';
import { json, requireUser, route } from '../../lib/server/http';
import { listTeamsForUser } from '../../db/queries/teams';

export const GET: APIRoute = (ctx) =>
  route(ctx, async ({ locals }) => {
    const user = requireUser(locals);
    const teams = await listTeamsForUser(user.id);
    return json({ user: { id: user.id, email: user.email, displayName: user.displayName }, teams: teams.map((t) => ({ id: t.team.id, name: t.team.name, role: t.role })) });
  });
