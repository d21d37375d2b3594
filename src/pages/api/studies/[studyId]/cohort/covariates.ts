// Subject covariates (numbers per subject code): read by members, replaced as a whole by leads and analysts.
import type { APIRoute } from 'astro';
import { HttpError, json, notFound, parseJson, requirePermission, requireUser, route } from '../../../../../lib/server/http';
import { getStudyForMember } from '../../../../../db/queries/teams';
import { listCovariates, saveCovariates } from '../../../../../db/queries/cohort';
import { COVARIATE_CAPS, CovariatesInput } from '../../../../../lib/schemas/cohort';

export const GET: APIRoute = (ctx) =>
  route(ctx, async ({ locals, params }) => {
    const user = requireUser(locals);
    const found = (await getStudyForMember(params.studyId ?? '', user.id)) ?? notFound('The study');
    requirePermission(found.role, 'study:view');
    return json(await listCovariates(found.study.id));
  });

export const PUT: APIRoute = (ctx) =>
  route(ctx, async ({ locals, params, request }) => {
    const user = requireUser(locals);
    const found = (await getStudyForMember(params.studyId ?? '', user.id)) ?? notFound('The study');
    requirePermission(found.role, 'cohort:covariates');
    const input = await parseJson(request, CovariatesInput, { maxBytes: COVARIATE_CAPS.bodyBytes });
    const saved = await saveCovariates({ id: found.study.id, teamId: found.team.id }, user.id, input);
    if (!saved.ok) {
      throw new HttpError(400, 'unknown_subject', `rows[${saved.row}].subject: "${saved.subject}" is not a subject of this study; nothing was saved`, [{ path: `rows.${saved.row}.subject`, message: `"${saved.subject}" is not a subject of this study` }]);
    }
    return json({ saved: saved.saved, covariates: await listCovariates(found.study.id) });
  });
