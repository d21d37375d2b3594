// Status changes, only in order: draft or returned → in review (the owner submits); in review → returned (a lead,
// with a reason) or signed off (a lead). Returning and signing off are signatures: the password is asked again
// (src/lib/server/signing.ts), and nobody signs their own session. `recipeVersion` names the version the person
// looked at; a newer one answers 409.
import type { APIRoute } from 'astro';
import { can } from '../../../../lib/permissions';
import { HttpError, json, parseJson, requirePermission, route } from '../../../../lib/server/http';
import { loadSession, signatureJson } from '../../../../lib/server/review-api';
import { applyStatusChange, transitions } from '../../../../db/queries/review';
import { StatusChangeInput } from '../../../../lib/schemas/review';
import { confirmSigner } from '../../../../lib/server/signing';
import { mailReviewOutcome, mailReviewRequested, type ReviewPlace } from '../../../../lib/server/review-mail';
import { wakeMailSender } from '../../../../lib/server/mail';

const actionOf = { submit: 'analysisSession:submit', return: 'analysisSession:return', signOff: 'analysisSession:signOff' } as const;

export const POST: APIRoute = (ctx) =>
  route(ctx, async ({ request, url }) => {
    const found = await loadSession(ctx);
    // A role that may make none of the changes is refused before the body is read; the change itself is checked below.
    if (!Object.values(actionOf).some((a) => can(found.role, a))) requirePermission(found.role, 'analysisSession:submit');
    const input = await parseJson(request, StatusChangeInput, { maxBytes: 8192 });
    requirePermission(found.role, actionOf[input.change]);
    const own = found.session.ownerId === found.user.id;
    if (input.change === 'submit' && !own) throw new HttpError(403, 'forbidden', 'Only the analyst who owns this session may submit it for review.');
    if (input.change !== 'submit' && own) throw new HttpError(403, 'own_session', 'Nobody signs their own session: ask another lead of the team. Nothing was signed.');
    // Refuse an out-of-order change before asking for the password (and before counting a wrong one).
    if (!(transitions[input.change].from as readonly string[]).includes(found.session.status)) {
      throw new HttpError(409, 'out_of_order', `The session is "${found.session.status}"; "${input.change}" applies only to a session that is ${transitions[input.change].from.map((s) => `"${s}"`).join(' or ')}.`);
    }
    const signer = input.change === 'submit'
      ? { id: found.user.id, displayName: found.user.displayName }
      : await confirmSigner(found, found.user.id, input.password, input.change === 'return' ? 'returned' : 'approved');
    const place: ReviewPlace = { url, team: found.team, study: found.study, session: found.session };
    const reason = input.change === 'return' ? input.reason : null;
    // The mail is queued in the status change's own transaction.
    const result = await applyStatusChange(found, signer, input.change, input.recipeVersion, reason, (tx) =>
      input.change === 'submit'
        ? mailReviewRequested(tx, place, signer, input.recipeVersion)
        : mailReviewOutcome(tx, place, signer, input.change === 'return' ? 'returned' : 'signed off', input.recipeVersion, reason));
    if (!result.ok && result.code === 'stale_version') {
      return json({ error: { code: 'stale_version', message: `Recipe version ${input.recipeVersion} is not the current one (it is ${result.currentVersion ?? 'none'}). Nothing was changed.` }, currentVersion: result.currentVersion }, 409);
    }
    if (!result.ok) throw new HttpError(409, 'out_of_order', `The session is "${result.status}"; "${input.change}" does not apply to it now.`);
    wakeMailSender();
    return json({ status: result.session.status, returnReason: result.session.returnReason, signature: result.signature ? signatureJson(result.signature) : null });
  });
