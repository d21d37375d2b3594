// The stored summaries of the study's sessions' current versions (what group results are computed from), as one
// JSON object keyed by analysis session id. Members read summaries anyway (the review routes); this is one request
// instead of one per session.
import type { APIRoute } from 'astro';
import { notFound, requirePermission, requireUser, route } from '../../../../../lib/server/http';
import { getStudyForMember } from '../../../../../db/queries/teams';
import { cohortSummariesJson, getCohortOverview } from '../../../../../db/queries/cohort';

export const GET: APIRoute = (ctx) =>
  route(ctx, async ({ locals, params }) => {
    const user = requireUser(locals);
    const found = (await getStudyForMember(params.studyId ?? '', user.id)) ?? notFound('The study');
    requirePermission(found.role, 'study:view');
    const { sessions } = await getCohortOverview(found.study.id);
    const body = await cohortSummariesJson(found.study.id, sessions.map((s) => s.analysisSessionId));
    return new Response(body, { headers: { 'content-type': 'application/json; charset=utf-8', 'cache-control': 'no-store' } });
  });
