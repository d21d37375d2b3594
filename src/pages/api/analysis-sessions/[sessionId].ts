// One analysis session: its subject, fingerprint, owner, status, current recipe version (with the recipe and the
// summary's hash), every version's number and hashes, and the signatures (the manifest). One of the busiest reads:
// PostgreSQL checks the membership and writes the whole answer in one statement (db/queries/json-answers.ts).
import type { APIRoute } from 'astro';
import { jsonText, notFound, requirePermission, requireUser, route } from '../../../lib/server/http';
import { sessionManifestJson } from '../../../db/queries/json-answers';

export const GET: APIRoute = (ctx) =>
  route(ctx, async () => {
    const user = requireUser(ctx.locals);
    const found = (await sessionManifestJson(ctx.params.sessionId ?? '', user.id)) ?? notFound('The analysis session');
    requirePermission(found.role, 'study:view');
    return jsonText(found.body);
  });
