// One analysis session: its subject, fingerprint, owner, status, current recipe version (with the recipe and the
// summary's hash), every version's number and hashes, and the signatures (the manifest). One of the busiest reads:
// one statement checks the sign-in and the membership and writes the whole answer (db/queries/json-answers.ts,
// lib/server/request-auth.ts).
import type { APIRoute } from 'astro';
import { jsonText, notFound, requirePermission, route } from '../../../lib/server/http';
import { readAsSignedIn } from '../../../lib/server/request-auth';
import { sessionManifestJson } from '../../../db/queries/json-answers';

export const GET: APIRoute = (ctx) =>
  route(ctx, async () => {
    const found = (await readAsSignedIn(ctx, (reader) => sessionManifestJson(ctx.params.sessionId ?? '', reader))) ?? notFound('The analysis session');
    requirePermission(found.role, 'study:view');
    return jsonText(found.body);
  });
