// The study's group-test design (statistics contract design.json plus the map test): read by members, saved by
// leads with optimistic concurrency (409 with the current design when someone saved in between).
import type { APIRoute } from 'astro';
import { json, notFound, parseJson, requirePermission, requireUser, route } from '../../../../../lib/server/http';
import { getStudyForMember } from '../../../../../db/queries/teams';
import { getCohortDesign, saveCohortDesign } from '../../../../../db/queries/cohort';
import { CohortDesignInput, DESIGN_CAPS } from '../../../../../lib/schemas/cohort';

export const GET: APIRoute = (ctx) =>
  route(ctx, async ({ locals, params }) => {
    const user = requireUser(locals);
    const found = (await getStudyForMember(params.studyId ?? '', user.id)) ?? notFound('The study');
    requirePermission(found.role, 'study:view');
    return json({ design: await getCohortDesign(found.study.id) });
  });

export const PUT: APIRoute = (ctx) =>
  route(ctx, async ({ locals, params, request }) => {
    const user = requireUser(locals);
    const found = (await getStudyForMember(params.studyId ?? '', user.id)) ?? notFound('The study');
    requirePermission(found.role, 'cohort:design');
    const input = await parseJson(request, CohortDesignInput, { maxBytes: DESIGN_CAPS.bodyBytes });
    const saved = await saveCohortDesign({ id: found.study.id, teamId: found.team.id }, user.id, input.revision, input.cohort);
    if (!saved.ok) return json({ error: { code: 'stale_design', message: 'Someone saved the design since you loaded it; nothing was changed. Reload to see theirs.' }, current: saved.current }, 409);
    return json({ design: await getCohortDesign(found.study.id) });
  });
