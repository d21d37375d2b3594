// One recipe version: the recipe as saved and the hashes of it and of its summary.
import type { APIRoute } from 'astro';
import { json, requirePermission, route } from '../../../../../lib/server/http';
import { loadSession, loadVersion, versionJson } from '../../../../../lib/server/review-api';
import { getSummaryHash } from '../../../../../db/queries/review';

export const GET: APIRoute = (ctx) =>
  route(ctx, async ({ params }) => {
    const found = await loadSession(ctx);
    requirePermission(found.role, 'study:view');
    const version = await loadVersion(found, params.number);
    return json({ version: { ...versionJson(version), summaryHash: await getSummaryHash(version.id) } });
  });
