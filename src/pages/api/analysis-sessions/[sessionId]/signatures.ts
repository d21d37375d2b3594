// The signature manifest of a session (who, printed name, when, meaning, version, content hash), and the one
// signature that changes no status: "reviewed" (a lead read it through), with the password asked again.
import type { APIRoute } from 'astro';
import { HttpError, json, parseJson, requirePermission, route } from '../../../../lib/server/http';
import { loadSession, signatureJson } from '../../../../lib/server/review-api';
import { applyStatusChange, listSignatures } from '../../../../db/queries/review';
import { ReviewedSignatureInput } from '../../../../lib/schemas/review';
import { confirmSigner } from '../../../../lib/server/signing';
import { CANONICALIZATION, SIGNED_CONTENT_FORMAT } from '../../../../lib/crypto/review-hash';

export const GET: APIRoute = (ctx) =>
  route(ctx, async () => {
    const found = await loadSession(ctx);
    requirePermission(found.role, 'study:view');
    return json({ contentHash: { format: SIGNED_CONTENT_FORMAT, canonicalization: CANONICALIZATION }, signatures: (await listSignatures(found.session.id)).map(signatureJson) });
  });

export const POST: APIRoute = (ctx) =>
  route(ctx, async ({ request }) => {
    const found = await loadSession(ctx);
    requirePermission(found.role, 'analysisSession:sign');
    const input = await parseJson(request, ReviewedSignatureInput, { maxBytes: 4096 });
    if (found.session.ownerId === found.user.id) throw new HttpError(403, 'own_session', 'Nobody signs their own session. Nothing was signed.');
    if (found.session.status !== 'in review') throw new HttpError(409, 'out_of_order', `The session is "${found.session.status}"; only a session in review can be signed as reviewed.`);
    const signer = await confirmSigner(found, found.user.id, input.password, 'reviewed');
    const result = await applyStatusChange(found, signer, 'reviewed', input.recipeVersion, null);
    if (!result.ok && result.code === 'stale_version') {
      return json({ error: { code: 'stale_version', message: `Recipe version ${input.recipeVersion} is not the current one (it is ${result.currentVersion ?? 'none'}). Nothing was signed.` }, currentVersion: result.currentVersion }, 409);
    }
    if (!result.ok) throw new HttpError(409, 'out_of_order', `The session is "${result.status}"; nothing was signed.`);
    return json({ signature: signatureJson(result.signature!) }, 201);
  });
