import { afterAll, describe, expect, it } from 'vitest';
import { Client, pool } from '../helpers/app';
import { createMember, createTeam } from '../helpers/fixtures';

afterAll(() => pool.end());

describe('roles and team boundaries on the API', () => {
  it('refuses a reviewer the analyst-only action (create an analysis session) with 403, and lets an analyst do it', async () => {
    const { team, study } = await createTeam();
    const reviewer = await createMember(team.id, 'reviewer');
    const analyst = await createMember(team.id, 'analyst');
    const reviewerClient = new Client();
    await reviewerClient.signIn(reviewer.email, reviewer.password);
    const refused = await reviewerClient.request(`/api/studies/${study.id}/analysis-sessions`, { method: 'POST', json: { subjectCode: 'TM-S01' } });
    expect(refused.status).toBe(403);
    expect((await refused.json()).error.code).toBe('forbidden');
    const { rows: none } = await pool.query('SELECT count(*)::int AS n FROM analysis_sessions WHERE study_id = $1', [study.id]);
    expect(none[0].n).toBe(0);

    const analystClient = new Client();
    await analystClient.signIn(analyst.email, analyst.password);
    const created = await analystClient.request(`/api/studies/${study.id}/analysis-sessions`, { method: 'POST', json: { subjectCode: 'TM-S01' } });
    expect(created.status).toBe(201);
    const body = await created.json();
    expect(body.analysisSession.status).toBe('draft');
    const { rows: audit } = await pool.query("SELECT actor_id FROM audit_events WHERE action = 'analysisSession.create' AND target_id = $1", [body.analysisSession.id]);
    expect(audit[0].actor_id).toBe(analyst.user.id);
  });

  it('answers every issue of an invalid body with its path', async () => {
    const { team, study } = await createTeam();
    const analyst = await createMember(team.id, 'analyst');
    const client = new Client();
    await client.signIn(analyst.email, analyst.password);
    const response = await client.request(`/api/studies/${study.id}/analysis-sessions`, {
      method: 'POST',
      json: { subjectCode: 'Jane Doe', fingerprint: 'abc' },
    });
    expect(response.status).toBe(400);
    const { error } = await response.json();
    expect(error.issues.map((i: { path: string }) => i.path).sort()).toEqual(['fingerprint', 'subjectCode']);
  });

  it('gives a member of another team 404 for a study, on the API and on the page', async () => {
    const a = await createTeam();
    const b = await createTeam();
    const outsider = await createMember(b.team.id, 'lead');
    const client = new Client();
    await client.signIn(outsider.email, outsider.password);
    const api = await client.request(`/api/studies/${a.study.id}`);
    expect(api.status).toBe(404);
    expect((await api.json()).error.code).toBe('not_found');
    const nonexistent = await client.request('/api/studies/00000000-0000-4000-8000-000000000000');
    expect(nonexistent.status).toBe(404);
    expect((await client.request(`/teams/${a.team.id}/studies/${a.study.id}`)).status).toBe(404);
    expect((await client.request(`/teams/${a.team.id}`)).status).toBe(404);
    const own = await client.request(`/api/studies/${b.study.id}`);
    expect(own.status).toBe(200);
  });

  it('asks for sign-in (401) before anything else', async () => {
    const { study } = await createTeam();
    const response = await new Client().request(`/api/studies/${study.id}`);
    expect(response.status).toBe(401);
  });

  it('keeps administration for administrators', async () => {
    const { team } = await createTeam();
    const lead = await createMember(team.id, 'lead');
    const admin = await createMember(team.id, 'admin');
    const leadClient = new Client();
    await leadClient.signIn(lead.email, lead.password);
    expect((await leadClient.request('/admin')).status).toBe(403);
    const adminClient = new Client();
    await adminClient.signIn(admin.email, admin.password);
    const page = await adminClient.request('/admin');
    expect(page.status).toBe(200);
    expect(await page.text()).toContain(lead.email);
  });
});
