// Slope check reports against the built app and real PostgreSQL: who saves and who reads, the caps and the strict
// schema (no samples, no file names), 404 across teams, the audit event, and the listing on the study page.
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { Client, pool } from '../helpers/app';
import { createMember, createTeam } from '../helpers/fixtures';
import { runSlopeSweep, type SlopeSweepInput } from '../../src/lib/analysis/slope-check';
import { slopeReportOf } from '../../src/lib/client/slope-report';
import { SLOPE_REPORT_CAPS, type SlopeReportInputT } from '../../src/lib/schemas/slope-reports';

let teamId: string;
let studyId: string;
let lead: Client;
let analyst: Client;
let reviewer: Client;
let otherLead: Client;
let report: SlopeReportInputT;

async function signedIn(teamIdOf: string, role: 'lead' | 'analyst' | 'reviewer') {
  const person = await createMember(teamIdOf, role);
  const c = new Client();
  await c.signIn(person.email, person.password);
  expect(c.cookies.has('tidemark_session')).toBe(true);
  return c;
}

beforeAll(async () => {
  const { team, study } = await createTeam();
  teamId = team.id;
  studyId = study.id;
  [lead, analyst, reviewer] = [await signedIn(team.id, 'lead'), await signedIn(team.id, 'analyst'), await signedIn(team.id, 'reviewer')];
  otherLead = await signedIn((await createTeam()).team.id, 'lead');
  // A real (small) bench run, turned into a report by the same function the screen uses.
  const input: SlopeSweepInput = {
    truth: { offset: 1, peaks: [{ centreHz: 10, widthHz: 1.5, heightLog10: 0.8 }], durationSeconds: 10, sampleRateHz: 200, seed: 1 },
    exponents: [1, 2],
    settings: [
      { name: 'robust 2-40 Hz', range: [2, 40], model: 'power-law', robust: true, segmentSeconds: 2, overlap: 0.5 },
      { name: 'plain 2-40 Hz', range: [2, 40], model: 'power-law', robust: false, segmentSeconds: 2, overlap: 0.5 },
    ],
    repetitions: 3,
    coverage: null,
  };
  report = slopeReportOf('Bench for the harbour study', input, runSlopeSweep(input), null);
}, 60_000);
afterAll(() => pool.end());

const path = () => `/api/studies/${studyId}/slope-reports`;

describe('saving a slope check report', () => {
  it('is allowed to analysts and leads (201, audited), refused to reviewers (403) and unknown across teams (404)', async () => {
    const saved = await analyst.request(path(), { method: 'POST', json: report });
    expect(saved.status).toBe(201);
    const body = await saved.json();
    expect(body.report).toMatchObject({ title: 'Bench for the harbour study', createdByName: 'Fixture analyst' });
    expect(body.report.report.results).toHaveLength(4);
    expect((await lead.request(path(), { method: 'POST', json: { ...report, title: 'Lead copy' } })).status).toBe(201);
    expect((await reviewer.request(path(), { method: 'POST', json: report })).status).toBe(403);
    expect((await otherLead.request(path(), { method: 'POST', json: report })).status).toBe(404);
    expect((await new Client().request(path(), { method: 'POST', json: report })).status).toBe(401);
    const { rows } = await pool.query(`SELECT count(*)::int AS n FROM slope_reports WHERE study_id = $1`, [studyId]);
    expect(rows[0].n).toBe(2);
    const audit = await pool.query(`SELECT actor_id, target_id, detail FROM audit_events WHERE action = 'slopeReport.save' AND team_id = $1 ORDER BY id`, [teamId]);
    expect(audit.rows).toHaveLength(2);
    expect(audit.rows[0].target_id).toBe(body.report.id);
    expect(audit.rows[0].detail).toMatchObject({ studyId, settings: ['robust 2-40 Hz', 'plain 2-40 Hz'], sensitivity: false });
  });

  it('is listed for every member, newest first, and for nobody outside the team', async () => {
    const list = await (await reviewer.request(path())).json();
    expect(list.reports.map((r: { title: string }) => r.title)).toEqual(['Lead copy', 'Bench for the harbour study']);
    expect(list.reports[1].report).toEqual(report);
    expect((await otherLead.request(path())).status).toBe(404);
    expect((await new Client().request(path())).status).toBe(401);
  });

  it('refuses what is not settings and figures, naming the field, and keeps what was saved', async () => {
    const issues = async (json: unknown) => {
      const r = await analyst.request(path(), { method: 'POST', json });
      expect(r.status).toBe(400);
      return (await r.json()).error.issues.map((i: { path: string }) => i.path);
    };
    expect(await issues({ ...report, samples: [1, 2, 3] })).toEqual(['(body)']);
    expect(await issues({ ...report, truth: { ...report.truth, fileName: 'x' } })).toEqual(['truth']);
    expect(await issues({ ...report, title: 'P0042_rest.edf' })).toEqual(['title']);
    expect(await issues({ ...report, settings: Array.from({ length: 7 }, (_, i) => ({ ...report.settings[0], name: `s${i}` })) })).toEqual(['settings']);
    // The same name twice: the second setting is named, and the rows of the setting that is now missing.
    expect(await issues({ ...report, settings: [report.settings[0], report.settings[0]] })).toEqual(['settings.1.name', 'results.1.setting', 'results.3.setting']);
    expect(await issues({ ...report, truth: { ...report.truth, repetitions: SLOPE_REPORT_CAPS.repetitions + 1 } })).toEqual(['truth.repetitions']);
    expect(await issues({ ...report, results: [{ ...report.results[0], setting: 'unknown' }] })).toEqual(['results.0.setting']);
    const sensitivity = {
      channel: 'Cz',
      fingerprint: null,
      rangeHz: [2, 40],
      model: 'power-law',
      startsHz: [1, 2],
      endsHz: [30, 40],
      grid: [1.1, 1.2, null, 1.15],
      interval: { estimate: 1.15, lower: 1.1, upper: 1.2, level: 0.9, segments: 40 },
      comparison: { preferred: 'power-law', deltaBic: -2.5, reason: 'Power law: the knee model does not lower BIC by more than 6.' },
    };
    expect(await issues({ ...report, sensitivity: { ...sensitivity, grid: [1.1, 1.2, 1.3] } })).toEqual(['sensitivity.grid']);
    expect(await issues({ ...report, sensitivity: { ...sensitivity, fingerprint: 'P0042_rest' } })).toEqual(['sensitivity.fingerprint']);
    const withSensitivity = await analyst.request(path(), { method: 'POST', json: { ...report, title: 'With sensitivity', sensitivity } });
    expect(withSensitivity.status).toBe(201);
    expect((await withSensitivity.json()).report.report.sensitivity).toEqual(sensitivity);
    const big = await analyst.request(path(), { method: 'POST', json: { ...report, title: 'x'.repeat(SLOPE_REPORT_CAPS.bodyBytes) } });
    expect(big.status).toBe(413);
    const { rows } = await pool.query(`SELECT count(*)::int AS n FROM slope_reports WHERE study_id = $1`, [studyId]);
    expect(rows[0].n).toBe(3);
  });

  it('shows on the study page to a reviewer, with its settings', async () => {
    const page = await reviewer.request(`/teams/${teamId}/studies/${studyId}`);
    expect(page.status).toBe(200);
    const html = await page.text();
    expect(html).toContain('Slope check reports');
    expect(html).toContain('Bench for the harbour study');
    expect(html).toContain('robust 2-40 Hz vs plain 2-40 Hz');
    expect(html).toContain('sensitivity on Cz');
  });
});
