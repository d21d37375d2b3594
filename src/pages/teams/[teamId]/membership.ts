// Form target of the Members page for changing a member's role or removing them (post, then back to the page with
// a notice: the page stays the one place that shows the result).
import type { APIRoute } from 'astro';
import { getTeamForMember, changeMemberRole, removeMember } from '../../../db/queries/teams';
import { can } from '../../../lib/permissions';
import { readForm } from '../../../lib/server/http';
import { MembershipChangeInput } from '../../../lib/schemas/auth';
import { statusPage } from '../../../lib/server/pages';

export const POST: APIRoute = async (ctx) => {
  const { locals, params, request, redirect } = ctx;
  if (!locals.user) return redirect(`/sign-in?next=${encodeURIComponent(`/teams/${params.teamId ?? ''}/members`)}`, 303);
  const found = await getTeamForMember(params.teamId ?? '', locals.user.id);
  if (!found) return statusPage(404, 'No such team, or you are not a member of it.');
  if (!can(found.role, 'member:manage')) return statusPage(403, `Your role (${found.role}) may not change memberships.`);
  const back = (query: string) => redirect(`/teams/${found.team.id}/members?${query}`, 303);
  // A form post is read with readForm whatever its shape, so a hand-made JSON body gets a message, not a crash.
  const form = await readForm(request, MembershipChangeInput);
  if (!form.ok) return back(`problem=${encodeURIComponent(form.message)}`);
  if (form.data.userId === locals.user.id) {
    return back(`problem=${encodeURIComponent('You cannot change or remove your own membership; ask another lead of the team.')}`);
  }
  if (form.data.intent === 'role') {
    const before = await changeMemberRole(found.team.id, form.data.userId, form.data.role, locals.user.id);
    if (before === null) return back(`problem=${encodeURIComponent('That person is not a member of this team.')}`);
    return back(`changed=${encodeURIComponent(`Role changed from ${before} to ${form.data.role}.`)}`);
  }
  const removed = await removeMember(found.team.id, form.data.userId, locals.user.id);
  if (!removed) return back(`problem=${encodeURIComponent('That person is not a member of this team.')}`);
  return back(`changed=${encodeURIComponent('Member removed from the team.')}`);
};
