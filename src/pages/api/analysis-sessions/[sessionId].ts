// One analysis session: its subject, fingerprint, owner, status, current recipe version (with the recipe and the
// summary's hash), every version's number and hashes, and the signatures (the manifest).
import type { APIRoute } from 'astro';
import { json, requirePermission, route } from '../../../lib/server/http';
import { loadSession, signatureJson, versionJson } from '../../../lib/server/review-api';
import { getRecipeVersion, listRecipeVersions, listSignatures } from '../../../db/queries/review';

export const GET: APIRoute = (ctx) =>
  route(ctx, async () => {
    const found = await loadSession(ctx);
    requirePermission(found.role, 'study:view');
    const s = found.session;
    // Independent reads, in parallel; the version list already carries each version's summary hash.
    const [current, versions, signed] = await Promise.all([
      s.currentVersion === null ? null : getRecipeVersion(s.id, s.currentVersion),
      listRecipeVersions(s.id),
      listSignatures(s.id),
    ]);
    const summaryHash = current ? (versions.find((v) => v.number === current.number)?.summaryHash ?? null) : null;
    return json({
      analysisSession: {
        id: s.id, studyId: s.studyId, subjectId: s.subjectId, subjectCode: s.subjectCode, fingerprint: s.fingerprint, ownerId: s.ownerId,
        status: s.status, returnReason: s.returnReason, currentVersion: s.currentVersion, createdAt: s.createdAt, updatedAt: s.updatedAt,
      },
      current: current ? { ...versionJson(current), summaryHash } : null,
      versions,
      signatures: signed.map(signatureJson),
    });
  });
