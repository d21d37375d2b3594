// The Cohort screen's first data: the study's sessions with current recipe versions, summary outlines, per-band
// digests and signatures, the covariates and the saved design. One of the busiest reads: one statement checks the
// sign-in and the membership and writes the answer (db/queries/json-answers.ts, lib/server/request-auth.ts); only a
// study with a summary not yet digested takes the longer path that digests it (once per summary).
import type { APIRoute } from 'astro';
import { jsonText, notFound, requirePermission, route } from '../../../../../lib/server/http';
import { readAsSignedIn } from '../../../../../lib/server/request-auth';
import { cohortOverviewAnswer } from '../../../../../db/queries/json-answers';
import { cohortOverviewJson } from '../../../../../db/queries/cohort';

export const GET: APIRoute = (ctx) =>
  route(ctx, async ({ params }) => {
    const found = (await readAsSignedIn(ctx, (reader) => cohortOverviewAnswer(params.studyId ?? '', reader))) ?? notFound('The study');
    requirePermission(found.role, 'study:view');
    return jsonText(found.undigested ? await cohortOverviewJson(params.studyId!) : found.body);
  });
