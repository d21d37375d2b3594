// The demo study's cohort as `npm start` and `npm test` seed it (issue 12, item 7): 12 sessions whose summaries the
// core computed from the demo EDF+ files, each signed off by the demo lead with the product's signed-content hash,
// and the demo's designed effects (src/lib/demo/cohort.ts) with their expected signs: theta rises after lamp-watch
// cues at Fz, the ~20 Hz rhythm is suppressed after oar-pull cues at Cz.
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { pool } from '../helpers/app';
import { signedIn } from '../helpers/review';
import { DEMO_STUDY, demoPerson } from '../helpers/workspace';
import { signedContentHash } from '../../src/lib/crypto/review-hash';
import { groupCells, type PooledSession } from '../../src/lib/cohort/values';
import { oneSampleTest } from '../../src/lib/statistics/t-tests';
import type { Client } from '../helpers/app';

let lead: Client;
let studyId: string;
beforeAll(async () => {
  lead = await signedIn(demoPerson('lead').email, demoPerson('lead').password);
  const { rows } = await pool.query(`SELECT id FROM studies WHERE name = $1`, [DEMO_STUDY]);
  studyId = rows[0].id;
});
afterAll(() => pool.end());

describe('the demo cohort', () => {
  it('has the 12 demo subjects signed off by the demo lead, each signature the hash of its version and summary', async () => {
    const body = await (await lead.request(`/api/studies/${studyId}/cohort`)).json();
    const demo = body.sessions.filter((s: { subject: string; signatures: unknown[] }) => /^TM-S(0[1-9]|1[0-2])$/.test(s.subject) && s.signatures.length > 0);
    expect(demo).toHaveLength(12);
    const { rows } = await pool.query(
      `SELECT a.id, a.fingerprint, v.number, v.recipe, s.summary, g.content_hash, g.printed_name, g.meaning
         FROM analysis_sessions a JOIN recipe_versions v ON v.analysis_session_id = a.id AND v.number = a.current_version
         JOIN summaries s ON s.recipe_version_id = v.id JOIN signatures g ON g.recipe_version_id = v.id
        WHERE a.study_id = $1 AND a.status = 'signed off'`,
      [studyId],
    );
    expect(rows.length).toBeGreaterThanOrEqual(12);
    for (const r of rows) {
      expect(r.printed_name).toBe('Maren Holt');
      expect(r.meaning).toBe('approved');
      expect(r.recipe.recording.fingerprint).toBe(r.fingerprint);
      expect(signedContentHash({ analysisSessionId: r.id, fingerprint: r.fingerprint, recipeVersion: r.number, recipe: r.recipe, summary: r.summary })).toBe(r.content_hash);
    }
  });

  it('shows the designed effects with the expected signs (one-sample t over the 12 subjects, p < 0.01)', async () => {
    const overview = await (await lead.request(`/api/studies/${studyId}/cohort`)).json();
    const ids = new Map<string, string>(overview.sessions.filter((s: { status: string; subject: string }) => s.status === 'signed off' && /^TM-S(0[1-9]|1[0-2])$/.test(s.subject)).map((s: { analysisSessionId: string; subject: string }) => [s.analysisSessionId, s.subject]));
    const { summaries } = await (await lead.request(`/api/studies/${studyId}/cohort/summaries`)).json();
    const pooled: PooledSession[] = [...ids].map(([id, subject]) => ({
      analysisSessionId: id, subject, recipeVersion: 1, recipeHash: '', signOff: 'signed-off',
      rows: summaries[id].bandValues.map((v: PooledSession['rows'][number]) => ({ ...v, subject })),
    }));
    const cells = groupCells(pooled);
    const cell = (band: string, condition: string, channel: string) => cells.find((c) => c.band === band && c.window === 'early' && c.condition === condition && c.channel === channel)!;
    const theta = cell('theta', 'lamp-watch', 'Fz');
    const beta = cell('beta', 'oar-pull', 'Cz');
    const thetaTest = oneSampleTest(theta.values.map((v) => v.value));
    const betaTest = oneSampleTest(beta.values.map((v) => v.value));
    console.log(`demo: theta lamp-watch Fz early ${theta.mean.toFixed(2)} dB (p ${thetaTest.p.toExponential(1)}); beta oar-pull Cz early ${beta.mean.toFixed(2)} dB (p ${betaTest.p.toExponential(1)})`);
    expect(theta.n).toBe(12);
    expect(theta.mean).toBeGreaterThan(0);
    expect(thetaTest.p).toBeLessThan(0.01);
    expect(beta.mean).toBeLessThan(0);
    expect(betaTest.p).toBeLessThan(0.01);
  });
});
