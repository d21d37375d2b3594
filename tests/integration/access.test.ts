import { afterAll, describe, expect, it } from 'vitest';
import { Client, pool } from '../helpers/app';
import { createMember, createOperator, createTeam } from '../helpers/fixtures';

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

  it('keeps site administration for operators, whatever their team roles', async () => {
    const { team } = await createTeam();
    const lead = await createMember(team.id, 'lead');
    const admin = await createOperator();
    const leadClient = new Client();
    await leadClient.signIn(lead.email, lead.password);
    expect((await leadClient.request('/admin')).status).toBe(403);
    const adminClient = new Client();
    await adminClient.signIn(admin.email, admin.password);
    const page = await adminClient.request('/admin');
    expect(page.status).toBe(200);
    expect(await page.text()).toContain(lead.email);
  });

  it('lets a lead change a member\'s role and remove a member, with audit events; not an analyst, not oneself', async () => {
    const { team } = await createTeam();
    const lead = await createMember(team.id, 'lead');
    const analyst = await createMember(team.id, 'analyst');
    const reviewer = await createMember(team.id, 'reviewer');
    const leadClient = new Client();
    await leadClient.signIn(lead.email, lead.password);

    const changed = await leadClient.post(`/teams/${team.id}/membership`, { intent: 'role', userId: reviewer.user.id, role: 'analyst' });
    expect(changed.status).toBe(303);
    expect(decodeURIComponent(changed.headers.get('location')!)).toContain('Role changed from reviewer to analyst.');
    const { rows: role } = await pool.query('SELECT role FROM memberships WHERE team_id = $1 AND user_id = $2', [team.id, reviewer.user.id]);
    expect(role[0].role).toBe('analyst');
    const page = await leadClient.request(changed.headers.get('location')!);
    expect(await page.text()).toContain('Role changed from reviewer to analyst.');

    // Bad input and one's own row change nothing.
    const badRole = await leadClient.post(`/teams/${team.id}/membership`, { intent: 'role', userId: analyst.user.id, role: 'owner' });
    expect(decodeURIComponent(badRole.headers.get('location')!)).toContain('problem=');
    const self = await leadClient.post(`/teams/${team.id}/membership`, { intent: 'remove', userId: lead.user.id });
    expect(decodeURIComponent(self.headers.get('location')!)).toContain('You cannot change or remove your own membership');
    const { rows: still } = await pool.query('SELECT role FROM memberships WHERE team_id = $1 ORDER BY role', [team.id]);
    expect(still.map((r) => r.role).sort()).toEqual(['analyst', 'analyst', 'lead']);

    // An analyst does not manage memberships.
    const analystClient = new Client();
    await analystClient.signIn(analyst.email, analyst.password);
    const refused = await analystClient.post(`/teams/${team.id}/membership`, { intent: 'remove', userId: reviewer.user.id });
    expect(refused.status).toBe(403);

    const removed = await leadClient.post(`/teams/${team.id}/membership`, { intent: 'remove', userId: reviewer.user.id });
    expect(decodeURIComponent(removed.headers.get('location')!)).toContain('Member removed from the team.');
    const { rows: gone } = await pool.query('SELECT count(*)::int AS n FROM memberships WHERE team_id = $1 AND user_id = $2', [team.id, reviewer.user.id]);
    expect(gone[0].n).toBe(0);
    const { rows: audit } = await pool.query("SELECT action, detail FROM audit_events WHERE team_id = $1 AND action LIKE 'membership.%' ORDER BY id", [team.id]);
    expect(audit.map((a) => a.action)).toEqual(['membership.role', 'membership.remove']);
    expect(audit[0].detail).toEqual({ from: 'reviewer', to: 'analyst' });
    // The removed person no longer sees the team.
    const former = new Client();
    await former.signIn(reviewer.email, reviewer.password);
    expect((await former.request(`/teams/${team.id}`)).status).toBe(404);
  });
});
