// Slope check reports of a study: read by every member, saved by analysts and leads (settings and derived figures only).
import type { APIRoute } from 'astro';
import { json, notFound, parseJson, requirePermission, requireUser, route } from '../../../../lib/server/http';
import { getStudyForMember } from '../../../../db/queries/teams';
import { createSlopeReport, listSlopeReports } from '../../../../db/queries/slope-reports';
import { SLOPE_REPORT_CAPS, SlopeReportInput } from '../../../../lib/schemas/slope-reports';

export const GET: APIRoute = (ctx) =>
  route(ctx, async ({ locals, params }) => {
    const user = requireUser(locals);
    const found = (await getStudyForMember(params.studyId ?? '', user.id)) ?? notFound('The study');
    requirePermission(found.role, 'slopeReport:view');
    return json({ reports: await listSlopeReports(found.study.id) });
  });

export const POST: APIRoute = (ctx) =>
  route(ctx, async ({ locals, params, request }) => {
    const user = requireUser(locals);
    const found = (await getStudyForMember(params.studyId ?? '', user.id)) ?? notFound('The study');
    requirePermission(found.role, 'slopeReport:save');
    const input = await parseJson(request, SlopeReportInput, { maxBytes: SLOPE_REPORT_CAPS.bodyBytes });
    return json({ report: await createSlopeReport({ id: found.study.id, teamId: found.team.id }, user.id, input) }, 201);
  });
