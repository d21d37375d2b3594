// One analysis session: its subject, fingerprint, owner, status, current recipe version (with the recipe and the
// summary's hash), every version's number and hashes, and the signatures (the manifest).
import type { APIRoute } from 'astro';
import { json, requirePermission, route } from '../../../lib/server/http';
import { loadSession, signatureJson, versionJson } from '../../../lib/server/review-api';
import { getRecipeVersion, getSummary, listRecipeVersions, listSignatures } from '../../../db/queries/review';

export const GET: APIRoute = (ctx) =>
  route(ctx, async () => {
    const found = await loadSession(ctx);
    requirePermission(found.role, 'study:view');
    const s = found.session;
    const current = s.currentVersion === null ? null : await getRecipeVersion(s.id, s.currentVersion);
    const summary = current ? await getSummary(current.id) : null;
    return json({
      analysisSession: {
        id: s.id, studyId: s.studyId, subjectId: s.subjectId, subjectCode: s.subjectCode, fingerprint: s.fingerprint, ownerId: s.ownerId,
        status: s.status, returnReason: s.returnReason, currentVersion: s.currentVersion, createdAt: s.createdAt, updatedAt: s.updatedAt,
      },
      current: current ? { ...versionJson(current), summaryHash: summary?.summaryHash ?? null } : null,
      versions: await listRecipeVersions(s.id),
      signatures: (await listSignatures(s.id)).map(signatureJson),
    });
  });
