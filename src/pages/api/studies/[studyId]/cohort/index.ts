// The Cohort screen's first data: the study's sessions with current recipe versions, summary outlines, per-band
// digests and signatures, the covariates and the saved design.
import type { APIRoute } from 'astro';
import { jsonText, notFound, requirePermission, requireUser, route } from '../../../../../lib/server/http';
import { getStudyForMember } from '../../../../../db/queries/teams';
import { cohortOverviewJson } from '../../../../../db/queries/cohort';

export const GET: APIRoute = (ctx) =>
  route(ctx, async ({ locals, params }) => {
    const user = requireUser(locals);
    const found = (await getStudyForMember(params.studyId ?? '', user.id)) ?? notFound('The study');
    requirePermission(found.role, 'study:view');
    return jsonText(await cohortOverviewJson(found.study.id));
  });
