// The summary of one recipe version: the derived numbers computed in the browser (never samples, never header
// fields). Uploaded once by the session's owner; strict schema and caps in src/lib/schemas/review.ts.
import type { APIRoute } from 'astro';
import { HttpError, json, notFound, parseJson, requirePermission, route } from '../../../../../../lib/server/http';
import { loadSession, loadVersion } from '../../../../../../lib/server/review-api';
import { getSummary, uploadSummary } from '../../../../../../db/queries/review';
import { SUMMARY_CAPS, SummaryInput } from '../../../../../../lib/schemas/review';

export const GET: APIRoute = (ctx) =>
  route(ctx, async ({ params }) => {
    const found = await loadSession(ctx);
    requirePermission(found.role, 'study:view');
    const version = await loadVersion(found, params.number);
    const summary = (await getSummary(version.id)) ?? notFound('A summary of that recipe version');
    return json({ recipeVersion: version.number, summary: summary.summary, summaryHash: summary.summaryHash, uploadedAt: summary.uploadedAt });
  });

export const PUT: APIRoute = (ctx) =>
  route(ctx, async ({ params, request }) => {
    const found = await loadSession(ctx);
    requirePermission(found.role, 'analysisSession:editOwn');
    if (found.session.ownerId !== found.user.id) throw new HttpError(403, 'forbidden', 'Only the analyst who owns this session may upload its summaries.');
    const version = await loadVersion(found, params.number);
    const summary = await parseJson(request, SummaryInput, { maxBytes: SUMMARY_CAPS.bodyBytes });
    // The size of what is stored (the validated summary as JSON), whatever the request's framing.
    const bytes = Buffer.byteLength(JSON.stringify(summary), 'utf8');
    const result = await uploadSummary(found, version, found.user.id, summary as unknown as Record<string, unknown>, bytes);
    if (!result.ok && result.reason === 'exists') {
      return json({ error: { code: 'summary_exists', message: `Recipe version ${version.number} already has its summary; a version's numbers never change. Save a new version to upload new numbers.` }, summaryHash: result.summaryHash }, 409);
    }
    if (!result.ok) throw new HttpError(409, 'in_review', 'The session is in review with this version; nothing was uploaded.');
    return json({ recipeVersion: version.number, summaryHash: result.summaryHash }, 201);
  });
