// Recipe versions of a session: list them, or save the next one. Optimistic concurrency: `baseVersion` must be the
// session's current version, else 409 with the current version (nothing is overwritten; the client merges or reloads).
import type { APIRoute } from 'astro';
import { HttpError, json, parseJson, requirePermission, route } from '../../../../lib/server/http';
import { loadSession, versionJson } from '../../../../lib/server/review-api';
import { listRecipeVersions, saveRecipeVersion } from '../../../../db/queries/review';
import { RECIPE_BODY_BYTES, RecipeVersionInput } from '../../../../lib/schemas/review';

export const GET: APIRoute = (ctx) =>
  route(ctx, async () => {
    const found = await loadSession(ctx);
    requirePermission(found.role, 'study:view');
    return json({ currentVersion: found.session.currentVersion, versions: await listRecipeVersions(found.session.id) });
  });

export const POST: APIRoute = (ctx) =>
  route(ctx, async ({ request }) => {
    const found = await loadSession(ctx);
    requirePermission(found.role, 'analysisSession:editOwn');
    if (found.session.ownerId !== found.user.id) throw new HttpError(403, 'forbidden', 'Only the analyst who owns this session may change its recipe.');
    const input = await parseJson(request, RecipeVersionInput, { maxBytes: RECIPE_BODY_BYTES });
    // A recipe that names its recording must name this session's recording.
    const named = input.recipe.recording?.fingerprint;
    if (named && found.session.fingerprint && named !== found.session.fingerprint) {
      const message = `is the fingerprint of another recording than this session's (${found.session.fingerprint.slice(0, 12)}…)`;
      throw new HttpError(400, 'invalid', `recipe.recording.fingerprint: ${message}. Nothing was saved.`, [{ path: 'recipe.recording.fingerprint', message }]);
    }
    const result = await saveRecipeVersion(found, found.user.id, input.baseVersion, input.recipe as Record<string, unknown>);
    if (!result.ok && result.reason === 'stale') {
      return json({
        error: { code: 'stale_version', message: `Version ${input.baseVersion ?? 'none'} is no longer the current one (it is ${result.current?.number ?? 'none'}). Nothing was saved: merge your change into the current version or reload it.` },
        current: result.current ? versionJson(result.current) : null,
      }, 409);
    }
    if (!result.ok) throw new HttpError(409, 'in_review', 'The session is in review; its recipe cannot change until a lead returns it. Nothing was saved.');
    return json({ version: versionJson(result.version), status: result.statusAfter }, 201);
  });
