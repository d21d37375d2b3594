import type { APIRoute } from 'astro';
import { json, notFound, parseJson, requirePermission, requireUser, route } from '../../../../lib/server/http';
import { getStudyForMember } from '../../../../db/queries/teams';
import { createAnalysisSession } from '../../../../db/queries/analysis-sessions';
import { listSessionsWithManifest } from '../../../../db/queries/review';
import { duplicateSessionWords } from '../../../../db/queries/review-import';
import { signatureJson } from '../../../../lib/server/review-api';
import { AnalysisSessionInput } from '../../../../lib/schemas/studies';

export const GET: APIRoute = (ctx) =>
  route(ctx, async ({ locals, params }) => {
    const user = requireUser(locals);
    const found = (await getStudyForMember(params.studyId!, user.id)) ?? notFound('The study');
    requirePermission(found.role, 'study:view');
    const rows = await listSessionsWithManifest(found.study.id);
    return json({ analysisSessions: rows.map((r) => ({ ...r.session, ownerName: r.ownerName, signatures: r.signatures.map(signatureJson) })) });
  });

export const POST: APIRoute = (ctx) =>
  route(ctx, async ({ locals, params, request }) => {
    const user = requireUser(locals);
    const found = (await getStudyForMember(params.studyId!, user.id)) ?? notFound('The study');
    requirePermission(found.role, 'analysisSession:create');
    const input = await parseJson(request, AnalysisSessionInput, { maxBytes: 4096 });
    const result = await createAnalysisSession(found.study.id, found.team.id, user.id, input);
    if (!result.ok) {
      return json({ error: { code: 'session_exists', message: `${duplicateSessionWords(input.subjectCode, result.existing)} Nothing was created.` }, existing: { id: result.existing.id, status: result.existing.status, currentVersion: result.existing.currentVersion } }, 409);
    }
    return json({ analysisSession: result.session }, 201);
  });
