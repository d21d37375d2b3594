// A study's subjects (codes the team chose, never names): list them, or add one ahead of its first session.
import type { APIRoute } from 'astro';
import { json, notFound, parseJson, requirePermission, requireUser, route } from '../../../../lib/server/http';
import { getStudyForMember } from '../../../../db/queries/teams';
import { createSubject, listSubjects } from '../../../../db/queries/review';
import { SubjectInput } from '../../../../lib/schemas/review';

export const GET: APIRoute = (ctx) =>
  route(ctx, async ({ locals, params }) => {
    const user = requireUser(locals);
    const found = (await getStudyForMember(params.studyId ?? '', user.id)) ?? notFound('The study');
    requirePermission(found.role, 'study:view');
    return json({ subjects: await listSubjects(found.study.id) });
  });

export const POST: APIRoute = (ctx) =>
  route(ctx, async ({ locals, params, request }) => {
    const user = requireUser(locals);
    const found = (await getStudyForMember(params.studyId ?? '', user.id)) ?? notFound('The study');
    requirePermission(found.role, 'analysisSession:create');
    const input = await parseJson(request, SubjectInput, { maxBytes: 1024 });
    const subject = await createSubject(found.study.id, found.team.id, user.id, input.code);
    return json({ subject: { id: subject.id, code: subject.code } }, subject.created ? 201 : 200);
  });
