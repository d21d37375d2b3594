// The Cohort screen's first data: the study's sessions with current recipe versions, summary outlines, per-band
// digests and signatures, the covariates and the saved design.
import type { APIRoute } from 'astro';
import { json, notFound, requirePermission, requireUser, route } from '../../../../../lib/server/http';
import { getStudyForMember } from '../../../../../db/queries/teams';
import { getCohortOverview } from '../../../../../db/queries/cohort';

export const GET: APIRoute = (ctx) =>
  route(ctx, async ({ locals, params }) => {
    const user = requireUser(locals);
    const found = (await getStudyForMember(params.studyId ?? '', user.id)) ?? notFound('The study');
    requirePermission(found.role, 'study:view');
    return json(await getCohortOverview(found.study.id));
  });
