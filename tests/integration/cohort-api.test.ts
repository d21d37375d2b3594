// The Cohort screen's server side against the built app and real PostgreSQL: the overview (sessions, digests,
// manifests), the summaries, covariates (caps, permissions, unknown subjects), the saved design (409 when stale),
// the page and the printable report (pooling refusal naming the field).
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { pool } from '../helpers/app';
import { assertClose } from '../helpers/assert-close';
import { createCohort, tern, type CohortFixture } from '../helpers/cohort';

let c: CohortFixture;
beforeAll(async () => {
  c = await createCohort({ signed: 10, unsigned: 2 });
}, 120_000);
afterAll(() => pool.end());

describe('the cohort overview', () => {
  it('lists every session with status, version, recipe hash, signatures and per-band digests averaged over channels', async () => {
    const r = await c.reviewer.request(`/api/studies/${c.studyId}/cohort`);
    expect(r.status).toBe(200);
    const body = await r.json();
    expect(body.sessions).toHaveLength(12);
    const first = body.sessions[0];
    expect(first).toMatchObject({ subject: 'TP-01', status: 'signed off', recipeVersion: 1 });
    expect(first.recipeHash).toMatch(/^[0-9a-f]{64}$/);
    expect(first.signatures[0]).toMatchObject({ meaning: 'approved', recipeVersionNumber: 1 });
    expect(body.sessions.filter((s: { status: string }) => s.status === 'in review')).toHaveLength(2);
    // The digest is the mean over the session's channels, recomputed here from the summary the fixture sent.
    const summary = tern(0);
    const rows = summary.bandValues.filter((v) => v.band === 'theta' && v.window === 'early' && v.condition === 'gull');
    assertClose(first.digest.theta.early.gull, rows.reduce((a, v) => a + v.normalized, 0) / rows.length, 1e-9);
    // The route splices PostgreSQL's JSON text of recipes, outlines and digests in as it is: the same values the
    // pages get from the parsed overview (getCohortOverview), value for value.
    const { getCohortOverview } = await import('../../src/db/queries/cohort');
    expect(body).toEqual(JSON.parse(JSON.stringify(await getCohortOverview(c.studyId))));
  });

  it('answers 404 to a lead of another team', async () => {
    const other = await createCohort({ signed: 0, unsigned: 0 });
    expect((await other.lead.request(`/api/studies/${c.studyId}/cohort`)).status).toBe(404);
    expect((await other.lead.request(`/api/studies/${c.studyId}/cohort/summaries`)).status).toBe(404);
  }, 60_000);

  it('hands every current summary back exactly as stored', async () => {
    const body = await (await c.analyst.request(`/api/studies/${c.studyId}/cohort/summaries`)).json();
    expect(Object.keys(body.summaries)).toHaveLength(12);
    expect(body.summaries[c.sessions[3].id].bandValues).toEqual(tern(3).bandValues);
  });
});

describe('covariates', () => {
  it('are saved by an analyst, read by a reviewer, refused to a reviewer', async () => {
    const input = { names: ['age', 'group'], rows: c.sessions.map((s, i) => ({ subject: s.subject, values: [20 + i, i % 2] })) };
    expect((await c.reviewer.request(`/api/studies/${c.studyId}/cohort/covariates`, { method: 'PUT', json: input })).status).toBe(403);
    const r = await c.analyst.request(`/api/studies/${c.studyId}/cohort/covariates`, { method: 'PUT', json: input });
    expect(r.status).toBe(200);
    expect((await r.json()).saved).toBe(24);
    const read = await (await c.reviewer.request(`/api/studies/${c.studyId}/cohort/covariates`)).json();
    expect(read.names).toEqual(['age', 'group']);
    expect(read.bySubject['TP-03']).toEqual({ age: 22, group: 0 });
    const { rows } = await pool.query(`SELECT count(*)::int AS n FROM audit_events WHERE action = 'covariates.save' AND detail->>'studyId' = $1`, [c.studyId]);
    expect(rows[0].n).toBe(1);
  });

  it('refuses an unknown subject naming its row, and keeps what was saved', async () => {
    const r = await c.lead.request(`/api/studies/${c.studyId}/cohort/covariates`, { method: 'PUT', json: { names: ['age'], rows: [{ subject: 'TP-01', values: [99] }, { subject: 'NOPE-1', values: [1] }] } });
    expect(r.status).toBe(400);
    expect((await r.json()).error.message).toMatch(/^rows\[1\]\.subject: "NOPE-1" is not a subject of this study; nothing was saved/);
    const read = await (await c.lead.request(`/api/studies/${c.studyId}/cohort/covariates`)).json();
    expect(read.bySubject['TP-01']).toEqual({ age: 20, group: 1 - 1 });
  });

  it('refuses a reserved or malformed name and a wrong number of values, naming the field', async () => {
    const bad = async (json: unknown) => (await (await c.lead.request(`/api/studies/${c.studyId}/cohort/covariates`, { method: 'PUT', json })).json()).error.issues.map((i: { path: string }) => i.path);
    expect(await bad({ names: ['value'], rows: [] })).toEqual(['names.0']);
    expect(await bad({ names: ['first name'], rows: [] })).toEqual(['names.0']);
    expect(await bad({ names: ['age'], rows: [{ subject: 'TP-01', values: [1, 2] }] })).toContain('rows.0.values');
    expect(await bad({ names: ['age'], rows: Array.from({ length: 2001 }, (_, i) => ({ subject: `S${i}`, values: [1] })) })).toEqual(['rows']);
  });
});

describe('the design saved with the study', () => {
  const cohort = { design: { neutral: 0, fdr: 0.05, seed: 7, tests: [{ name: 'gull', kind: 'one-sample', condition: 'gull' }] }, mapTest: { channelGroup: 'frontal', conditions: ['gull'] } };
  it('is saved by a lead, refused to an analyst, and a stale save answers 409 with the current design', async () => {
    expect((await c.analyst.request(`/api/studies/${c.studyId}/cohort/design`, { method: 'PUT', json: { revision: null, cohort } })).status).toBe(403);
    const first = await c.lead.request(`/api/studies/${c.studyId}/cohort/design`, { method: 'PUT', json: { revision: null, cohort } });
    expect(first.status).toBe(200);
    expect((await first.json()).design).toMatchObject({ revision: 1, cohort: { mapTest: { alpha: 0.05 } } });
    const stale = await c.lead.request(`/api/studies/${c.studyId}/cohort/design`, { method: 'PUT', json: { revision: null, cohort } });
    expect(stale.status).toBe(409);
    expect((await stale.json()).current.revision).toBe(1);
    expect((await c.lead.request(`/api/studies/${c.studyId}/cohort/design`, { method: 'PUT', json: { revision: 1, cohort } })).status).toBe(200);
    expect((await (await c.reviewer.request(`/api/studies/${c.studyId}/cohort/design`)).json()).design.revision).toBe(2);
  });

  it('refuses a design the statistics contract refuses, naming the field', async () => {
    const r = await c.lead.request(`/api/studies/${c.studyId}/cohort/design`, { method: 'PUT', json: { revision: 2, cohort: { design: { neutral: 0, fdr: 2, tests: [] } } } });
    expect(r.status).toBe(400);
    expect((await r.json()).error.issues[0].path).toBe('cohort.design.fdr');
  });

  it('comes back in the overview, which is PostgreSQL\'s JSON text equal to the object-built overview on both paths', async () => {
    // By now the study has covariates and a saved design (the tests above). The route answers from one statement
    // (db/queries/json-answers.ts); with a summary not yet digested it takes the path that digests it. Both give the
    // same values as getCohortOverview, which builds the overview from parsed rows.
    const { getCohortOverview } = await import('../../src/db/queries/cohort');
    const read = async () => (await c.reviewer.request(`/api/studies/${c.studyId}/cohort`)).json();
    const direct = await read();
    expect(direct.design.revision).toBe(2);
    expect(direct.covariates.names).toEqual(['age', 'group']);
    expect(direct).toEqual(JSON.parse(JSON.stringify(await getCohortOverview(c.studyId))));
    await pool.query('DELETE FROM summary_digests WHERE recipe_version_id = (SELECT v.id FROM recipe_versions v JOIN analysis_sessions a ON a.id = v.analysis_session_id AND v.number = a.current_version WHERE a.id = $1)', [c.sessions[4].id]);
    const redigested = await read();
    expect(redigested).toEqual(direct);
    const { rows } = await pool.query('SELECT count(*)::int AS n FROM summary_digests d JOIN recipe_versions v ON v.id = d.recipe_version_id WHERE v.analysis_session_id = $1', [c.sessions[4].id]);
    expect(rows[0].n).toBe(1);
    expect(await read()).toEqual(direct);
  });
});

describe('the Cohort page and its report', () => {
  it('renders the session table in the first HTML and links from the study page', async () => {
    const study = await (await c.reviewer.request(`/teams/${c.teamId}/studies/${c.studyId}`)).text();
    expect(study).toContain(`/teams/${c.teamId}/studies/${c.studyId}/cohort`);
    const page = await (await c.reviewer.request(`/teams/${c.teamId}/studies/${c.studyId}/cohort`)).text();
    expect(page).toContain('data-testid="cohort-sessions"');
    expect(page.match(/data-enters="yes"/g)).toHaveLength(10);
  });

  it('the report lists the manifests, refuses unsigned sessions to a non-lead, and marks them for a lead', async () => {
    const report = await (await c.reviewer.request(`/teams/${c.teamId}/studies/${c.studyId}/cohort/report`)).text();
    expect(report).toContain('data-testid="report-manifest"');
    const { rows } = await pool.query(`SELECT content_hash FROM signatures s JOIN analysis_sessions a ON a.id = s.analysis_session_id WHERE a.study_id = $1`, [c.studyId]);
    expect(rows).toHaveLength(10);
    for (const r of rows) expect(report).toContain(r.content_hash);
    expect(report).toContain('Research use only');
    expect(report).not.toContain('data-testid="unsigned-marker"');
    expect((await c.reviewer.request(`/teams/${c.teamId}/studies/${c.studyId}/cohort/report?unsigned=1`)).status).toBe(403);
    const withUnsigned = await (await c.lead.request(`/teams/${c.teamId}/studies/${c.studyId}/cohort/report?unsigned=1`)).text();
    expect(withUnsigned).toContain('Includes 2 unsigned sessions');
  });

  it('the report refuses to pool a session whose baseline differs, naming the field', async () => {
    const mixed = await createCohort({ signed: 3, unsigned: 1, recipeEdit: (r) => { r.baseline.start = -0.45; } });
    const html = await (await mixed.lead.request(`/teams/${mixed.teamId}/studies/${mixed.studyId}/cohort/report?unsigned=1`)).text();
    expect(html).toMatch(/Cannot pool: baseline\.start differs — -0\.5 in TP-01 \(version 1\), -0\.45 in TP-04 \(version 1\)/);
  }, 60_000);
});
