// The Cohort screen's first data: the study's sessions with current recipe versions, summary outlines, per-band
// digests and signatures, the covariates and the saved design. One of the busiest reads: PostgreSQL checks the
// membership and writes the answer in one statement (db/queries/json-answers.ts); only a study with a summary not
// yet digested takes the longer path that digests it (once per summary).
import type { APIRoute } from 'astro';
import { jsonText, notFound, requirePermission, requireUser, route } from '../../../../../lib/server/http';
import { cohortOverviewAnswer } from '../../../../../db/queries/json-answers';
import { cohortOverviewJson } from '../../../../../db/queries/cohort';

export const GET: APIRoute = (ctx) =>
  route(ctx, async ({ locals, params }) => {
    const user = requireUser(locals);
    const found = (await cohortOverviewAnswer(params.studyId ?? '', user.id)) ?? notFound('The study');
    requirePermission(found.role, 'study:view');
    return jsonText(found.undigested ? await cohortOverviewJson(params.studyId!) : found.body);
  });
