// Site administration is not a team role (issue 8, item 7): operators manage people, teams and read the site audit;
// they see no team's studies unless also a member; invitations never change an existing member's role; only a
// lead changes roles in their team, and never to operator. Everything through the built app over HTTP, checked
// in PostgreSQL.
import { afterAll, describe, expect, it } from 'vitest';
import { Client, latestMailId, linkIn, pool, unique, waitForMail } from '../helpers/app';
import { createMember, createOperator, createTeam } from '../helpers/fixtures';
import { db } from '../../src/db/client';
import { recordAudit } from '../../src/db/queries/audit';

afterAll(() => pool.end());

async function signedIn(person: { email: string; password: string }): Promise<Client> {
  const client = new Client();
  const response = await client.signIn(person.email, person.password);
  expect(response.status, `sign-in of ${person.email}`).toBe(302);
  return client;
}

async function auditFor(targetId: string, prefix: string) {
  const { rows } = await pool.query('SELECT action, actor_id FROM audit_events WHERE target_id = $1 AND action LIKE $2 ORDER BY id', [targetId, `${prefix}%`]);
  return rows as { action: string; actor_id: string | null }[];
}

const rowOf = (html: string, email: string) => {
  const start = html.indexOf(`data-person="${email.toLowerCase()}"`);
  expect(start, `row of ${email}`).toBeGreaterThan(-1);
  return html.slice(start, html.indexOf('</tr>', start));
};

describe('People: every account, its teams, roles and state', () => {
  it('lists active, invited and suspended people with their teams and roles; a lead gets 403', async () => {
    const { team } = await createTeam();
    const lead = await createMember(team.id, 'lead');
    const analyst = await createMember(team.id, 'analyst');
    const operator = await createOperator();
    await pool.query('UPDATE users SET disabled_at = now() WHERE id = $1', [analyst.user.id]);
    const invitee = `${unique('pending')}@fixture.example`;
    const since = await latestMailId();
    const leadClient = await signedIn(lead);
    expect((await leadClient.post(`/teams/${team.id}/members`, { email: invitee, role: 'reviewer' })).status).toBe(200);
    await waitForMail(invitee, since);

    const page = await (await signedIn(operator)).request('/admin');
    expect(page.status).toBe(200);
    const html = await page.text();
    expect(rowOf(html, lead.email)).toContain('>active<');
    expect(rowOf(html, lead.email)).toContain(team.name);
    expect(rowOf(html, lead.email)).toContain('>lead<');
    expect(rowOf(html, analyst.email)).toContain('>suspended<');
    expect(rowOf(html, analyst.email)).toContain('Reactivate');
    expect(rowOf(html, invitee)).toContain('>invited<');
    expect(rowOf(html, invitee)).toContain('>reviewer<');
    expect(rowOf(html, operator.email)).toContain('>you<');
    expect(rowOf(html, operator.email)).toContain('data-testid="operator-flag"');

    const refused = await leadClient.request('/admin');
    expect(refused.status).toBe(403);
    expect(await refused.text()).not.toContain(analyst.email);
  });
});

describe('granting and revoking the operator flag', () => {
  it('grants and revokes, audits both, and gives the person\'s session a new id on its next request', async () => {
    const { team } = await createTeam();
    const analyst = await createMember(team.id, 'analyst');
    const operator = await createOperator();
    const opClient = await signedIn(operator);
    const target = await signedIn(analyst);
    expect((await target.request('/admin')).status).toBe(403);
    const cookieBefore = target.cookies.get('tidemark_session');

    const granted = await opClient.post('/admin', { intent: 'grantOperator', userId: analyst.user.id });
    expect(granted.status).toBe(303);
    expect(granted.headers.get('location')).toBe(`/admin?done=grantOperator&who=${analyst.user.id}`);
    const notice = await (await opClient.request(granted.headers.get('location')!)).text();
    expect(notice).toContain('Fixture analyst is now an operator.');
    const { rows: flag } = await pool.query('SELECT is_operator FROM users WHERE id = $1', [analyst.user.id]);
    expect(flag[0].is_operator).toBe(true);

    // The same browser, no new sign-in: the rights changed, so the session id changes with them.
    const asOperator = await target.request('/admin');
    expect(asOperator.status).toBe(200);
    expect(target.lastSetCookie.some((c) => c.startsWith('tidemark_session='))).toBe(true);
    expect(target.cookies.get('tidemark_session')).not.toBe(cookieBefore);

    const revoked = await opClient.post('/admin', { intent: 'revokeOperator', userId: analyst.user.id });
    expect(revoked.status).toBe(303);
    expect((await target.request('/admin')).status).toBe(403);
    expect((await auditFor(analyst.user.id, 'site.')).map((r) => [r.action, r.actor_id])).toEqual([
      ['site.grantOperator', operator.user.id],
      ['site.revokeOperator', operator.user.id],
    ]);
  });

  it('never acts on the operator\'s own account, names an unknown account and a bad change, and changes nothing', async () => {
    const operator = await createOperator();
    const other = await createOperator();
    const opClient = await signedIn(operator);

    const self = await opClient.post('/admin', { intent: 'revokeOperator', userId: operator.user.id });
    expect(self.status).toBe(400);
    expect(await self.text()).toContain('You cannot change your own account here');
    const selfSuspend = await opClient.post('/admin', { intent: 'suspend', userId: operator.user.id });
    expect(selfSuspend.status).toBe(400);

    const unknown = await opClient.post('/admin', { intent: 'suspend', userId: 'no-such-account' });
    expect(unknown.status).toBe(404);
    expect(await unknown.text()).toContain('No such account. Nothing was changed.');

    const bad = await opClient.post('/admin', { intent: 'delete', userId: other.user.id });
    expect(bad.status).toBe(400);
    expect(await bad.text()).toContain('Choose one of the offered changes. Nothing was changed.');

    const again = await opClient.post('/admin', { intent: 'grantOperator', userId: other.user.id });
    expect(again.status).toBe(409);
    expect(await again.text()).toContain('is already an operator');

    const { rows } = await pool.query('SELECT id, is_operator, disabled_at FROM users WHERE id = ANY($1) ORDER BY id', [[operator.user.id, other.user.id]]);
    expect(rows.every((r) => r.is_operator === true && r.disabled_at === null)).toBe(true);
    expect(await auditFor(operator.user.id, 'site.')).toEqual([]);
    expect(await auditFor(other.user.id, 'site.')).toEqual([]);
  });

  it('refuses a lead who posts to the operator area (403) and changes nothing', async () => {
    const { team } = await createTeam();
    const lead = await createMember(team.id, 'lead');
    const analyst = await createMember(team.id, 'analyst');
    const refused = await (await signedIn(lead)).post('/admin', { intent: 'grantOperator', userId: lead.user.id });
    expect(refused.status).toBe(403);
    const alsoRefused = await (await signedIn(lead)).post('/admin', { intent: 'suspend', userId: analyst.user.id });
    expect(alsoRefused.status).toBe(403);
    const { rows } = await pool.query('SELECT is_operator, disabled_at FROM users WHERE id = ANY($1)', [[lead.user.id, analyst.user.id]]);
    expect(rows.every((r) => r.is_operator === false && r.disabled_at === null)).toBe(true);
  });
});

describe('suspending and reactivating an account', () => {
  it('sets disabled_at, ends every session at once, refuses sign-in, and reactivation lets the person back in', async () => {
    const { team } = await createTeam();
    const analyst = await createMember(team.id, 'analyst');
    const operator = await createOperator();
    const laptop = await signedIn(analyst);
    const desktop = await signedIn(analyst);
    const { rows: before } = await pool.query('SELECT count(*)::int AS n FROM sessions WHERE user_id = $1', [analyst.user.id]);
    expect(before[0].n).toBe(2);

    const opClient = await signedIn(operator);
    const suspended = await opClient.post('/admin', { intent: 'suspend', userId: analyst.user.id });
    expect(suspended.status).toBe(303);
    expect(await (await opClient.request(suspended.headers.get('location')!)).text()).toContain('is suspended and signed out everywhere.');
    const { rows: after } = await pool.query('SELECT count(*)::int AS n FROM sessions WHERE user_id = $1', [analyst.user.id]);
    expect(after[0].n).toBe(0);
    const { rows: state } = await pool.query('SELECT disabled_at FROM users WHERE id = $1', [analyst.user.id]);
    expect(state[0].disabled_at).toBeInstanceOf(Date);
    expect((await laptop.request('/api/me')).status).toBe(401);
    expect((await desktop.request(`/teams/${team.id}`)).headers.get('location')).toMatch(/^\/sign-in/);

    const refused = await new Client().signIn(analyst.email, analyst.password);
    expect(refused.status).toBe(403);
    expect(await refused.text()).toContain('This account is suspended.');

    const back = await opClient.post('/admin', { intent: 'reactivate', userId: analyst.user.id });
    expect(back.status).toBe(303);
    const { rows: cleared } = await pool.query('SELECT disabled_at FROM users WHERE id = $1', [analyst.user.id]);
    expect(cleared[0].disabled_at).toBeNull();
    expect((await new Client().signIn(analyst.email, analyst.password)).status).toBe(302);
    expect((await auditFor(analyst.user.id, 'site.')).map((r) => r.action)).toEqual(['site.suspend', 'site.reactivate']);
  });
});

describe('a suspended account and invitations', () => {
  it('cannot join a team through an invitation: refused with a message, no membership, no session, link still unused', async () => {
    const { team } = await createTeam();
    const lead = await createMember(team.id, 'lead');
    const other = await createTeam();
    const suspended = await createMember(other.team.id, 'analyst');
    const operator = await createOperator();
    expect((await (await signedIn(operator)).post('/admin', { intent: 'suspend', userId: suspended.user.id })).status).toBe(303);
    const since = await latestMailId();
    await (await signedIn(lead)).post(`/teams/${team.id}/members`, { email: suspended.email, role: 'analyst' });
    const path = linkIn((await waitForMail(suspended.email, since)).text, '/invitations/');
    const client = new Client();
    const refused = await client.post(path, { displayName: 'Fixture analyst', password: suspended.password, confirm: suspended.password });
    expect(refused.status).toBe(403);
    expect(await refused.text()).toContain('This account is suspended, so it cannot join a team.');
    expect(client.cookies.has('tidemark_session')).toBe(false);
    const { rows } = await pool.query('SELECT count(*)::int AS n FROM memberships WHERE team_id = $1 AND user_id = $2', [team.id, suspended.user.id]);
    expect(rows[0].n).toBe(0);
    const { rows: sessions } = await pool.query('SELECT count(*)::int AS n FROM sessions WHERE user_id = $1', [suspended.user.id]);
    expect(sessions[0].n).toBe(0);
    const { rows: inv } = await pool.query('SELECT accepted_at FROM invitations WHERE team_id = $1 AND lower(email) = lower($2)', [team.id, suspended.email]);
    expect(inv).toEqual([{ accepted_at: null }]);
  });
});

describe('Teams: an operator creates a team and invites its first lead', () => {
  it('creates the team, mails the lead an invitation, and the invitee joins as its lead', async () => {
    const operator = await createOperator();
    const opClient = await signedIn(operator);
    const name = unique('Tideline Unit');
    const leadEmail = `${unique('first-lead')}@fixture.example`;
    const since = await latestMailId();
    const created = await opClient.post('/admin/teams', { name, leadEmail });
    expect(created.status).toBe(303);
    const { rows: teamRows } = await pool.query('SELECT id, slug FROM teams WHERE name = $1', [name]);
    expect(teamRows).toHaveLength(1);
    const teamId = teamRows[0].id as string;
    expect(created.headers.get('location')).toBe(`/admin/teams?created=${teamId}`);
    const listing = await (await opClient.request(created.headers.get('location')!)).text();
    expect(listing).toContain(`Team ${name} created.`);

    const mail = await waitForMail(leadEmail, since);
    expect(mail.subject).toBe(`You are invited to lead ${name} on Tidemark`);
    const path = linkIn(mail.text, '/invitations/');
    const invitee = new Client();
    const accepted = await invitee.post(path, { displayName: 'First Lead', password: 'first-lead-password', confirm: 'first-lead-password' });
    expect(accepted.status).toBe(303);
    expect(accepted.headers.get('location')).toBe(`/teams/${teamId}`);
    const me = await (await invitee.request('/api/me')).json();
    expect(me.teams).toEqual([{ id: teamId, name, role: 'lead' }]);

    // The operator created the team but is not in it.
    const { rows: opMember } = await pool.query('SELECT count(*)::int AS n FROM memberships WHERE team_id = $1 AND user_id = $2', [teamId, operator.user.id]);
    expect(opMember[0].n).toBe(0);
    expect((await opClient.request(`/teams/${teamId}`)).status).toBe(404);
    const { rows: audit } = await pool.query('SELECT action, actor_id FROM audit_events WHERE team_id = $1 ORDER BY id', [teamId]);
    expect(audit.map((a) => a.action)).toEqual(['site.createTeam', 'invitation.create', 'invitation.accept']);
    expect(audit[0].actor_id).toBe(operator.user.id);
    expect((await (await opClient.request('/admin/teams')).text())).toContain('First Lead');
  });

  it('answers an empty name, a bad e-mail and a name already taken with messages, and creates nothing', async () => {
    const operator = await createOperator();
    const opClient = await signedIn(operator);
    const { team } = await createTeam();
    const { rows: count0 } = await pool.query('SELECT count(*)::int AS n FROM teams');

    const empty = await opClient.post('/admin/teams', { name: '  ', leadEmail: 'not-an-address' });
    expect(empty.status).toBe(400);
    const emptyHtml = await empty.text();
    expect(emptyHtml).toContain('Enter a team name.');
    expect(emptyHtml).toContain('Enter a valid e-mail address.');

    const taken = await opClient.post('/admin/teams', { name: team.name.toUpperCase(), leadEmail: 'someone@fixture.example' });
    expect(taken.status).toBe(409);
    expect(await taken.text()).toContain('already exists. Nothing was changed.');

    const { rows: count1 } = await pool.query('SELECT count(*)::int AS n FROM teams');
    expect(count1[0].n).toBe(count0[0].n);
    const { rows: inv } = await pool.query("SELECT count(*)::int AS n FROM invitations WHERE email = 'someone@fixture.example'");
    expect(inv[0].n).toBe(0);
  });
});

describe('Site audit: newest first, paged, filtered by action prefix, read-only', () => {
  it('filters by prefix, pages back through older events, and refuses a bad filter with a message', async () => {
    const operator = await createOperator();
    const opClient = await signedIn(operator);
    // Sixty site events of our own, so the filtered audit spans two pages.
    const target = await createOperator();
    // Through the app's one audit writer, so the site's hash chain stays whole (`audit:verify` passes on this database).
    for (let n = 1; n <= 60; n++) {
      await recordAudit(db, { actorId: operator.user.id, action: 'site.fixtureEvent', targetTable: 'users', targetId: target.user.id, detail: { n } });
    }
    const first = await opClient.request('/admin/audit?action=site.fixtureEvent');
    expect(first.status).toBe(200);
    const html = await first.text();
    const numbers = [...html.matchAll(/<span class="text-ink-soft">n<\/span> (\d+)/g)].map((m) => Number(m[1]));
    expect(numbers).toHaveLength(50);
    expect(numbers[0]).toBe(60);
    expect(numbers[49]).toBe(11);
    const actions = [...html.matchAll(/data-action="([^"]+)"/g)].map((m) => m[1]);
    expect(new Set(actions)).toEqual(new Set(['site.fixtureEvent']));
    const older = /href="([^"]+)" data-testid="audit-older"/.exec(html);
    expect(older?.[1]).toBeTruthy();
    const second = await (await opClient.request(older![1].replace(/&#38;|&amp;/g, '&'))).text();
    const rest = [...second.matchAll(/<span class="text-ink-soft">n<\/span> (\d+)/g)].map((m) => Number(m[1]));
    expect(rest).toEqual([10, 9, 8, 7, 6, 5, 4, 3, 2, 1]);
    expect(second).not.toContain('data-testid="audit-older"');

    const bad = await opClient.request('/admin/audit?action=%27%3B%20drop');
    expect(bad.status).toBe(400);
    expect(await bad.text()).toContain('An action prefix has letters and dots only');
    const badPage = await opClient.request('/admin/audit?before=-3');
    expect(badPage.status).toBe(400);
    expect(await badPage.text()).toContain('Page: Use an event number above 0.');

    const post = await opClient.post('/admin/audit', { action: 'x' });
    expect(post.status).toBe(405);
    expect(post.headers.get('allow')).toBe('GET, HEAD');
  });

  it('shows who created a study but keeps the study\'s details (its name) with the team', async () => {
    const { team } = await createTeam();
    const lead = await createMember(team.id, 'lead');
    const studyName = unique('Secret study');
    const made = await (await signedIn(lead)).request(`/api/teams/${team.id}/studies`, { method: 'POST', json: { name: studyName, description: '' } });
    expect(made.status).toBe(201);
    const operator = await createOperator();
    const html = await (await (await signedIn(operator)).request('/admin/audit?action=study.')).text();
    expect(html).toContain('study.create');
    expect(html).toContain('data-testid="detail-kept"');
    expect(html).not.toContain(studyName);
  });
});

describe('an operator sees no team\'s studies unless also a member', () => {
  it('gets 404 for the team, its studies and their API, then sees them once a lead invites them in', async () => {
    const { team, study } = await createTeam();
    const lead = await createMember(team.id, 'lead');
    const operator = await createOperator();
    const opClient = await signedIn(operator);
    for (const path of [
      `/teams/${team.id}`,
      `/teams/${team.id}/members`,
      `/teams/${team.id}/studies/${study.id}`,
      `/teams/${team.id}/studies/${study.id}/workspace`,
      `/api/studies/${study.id}`,
      `/api/studies/${study.id}/analysis-sessions`,
      `/api/teams/${team.id}/studies`,
    ]) {
      expect((await opClient.request(path)).status, path).toBe(404);
    }
    expect((await (await opClient.request('/api/me')).json()).teams).toEqual([]);

    const since = await latestMailId();
    await (await signedIn(lead)).post(`/teams/${team.id}/members`, { email: operator.email, role: 'reviewer' });
    const path = linkIn((await waitForMail(operator.email, since)).text, '/invitations/');
    const joined = await opClient.post(path, { displayName: 'Fixture operator', password: operator.password, confirm: operator.password });
    expect(joined.status).toBe(303);
    expect((await opClient.request(`/api/studies/${study.id}`)).status).toBe(200);
    expect((await opClient.request(`/teams/${team.id}/studies/${study.id}`)).status).toBe(200);
    // A member as reviewer, still not a lead: the operator flag adds nothing inside the team.
    expect((await opClient.request(`/api/teams/${team.id}/studies`, { method: 'POST', json: { name: 'x', description: '' } })).status).toBe(403);
  });
});

describe('invitations never change an existing member\'s role', () => {
  it('an analyst who accepts an invitation as lead (through the mailed link) stays an analyst', async () => {
    const { team } = await createTeam();
    const lead = await createMember(team.id, 'lead');
    const analyst = await createMember(team.id, 'analyst');
    const since = await latestMailId();
    const sent = await (await signedIn(lead)).post(`/teams/${team.id}/members`, { email: analyst.email, role: 'lead' });
    expect(sent.status).toBe(200);
    const path = linkIn((await waitForMail(analyst.email, since)).text, '/invitations/');

    const wrong = await new Client().post(path, { displayName: 'Fixture analyst', password: 'not-the-password', confirm: 'not-the-password' });
    expect(wrong.status).toBe(400);
    const accepted = await new Client().post(path, { displayName: 'Fixture analyst', password: analyst.password, confirm: analyst.password });
    expect(accepted.status).toBe(303);
    expect(decodeURIComponent(accepted.headers.get('location')!)).toBe(`/teams/${team.id}?notice=You were already a member as analyst; your role stays as it is.`);
    const { rows } = await pool.query('SELECT role FROM memberships WHERE team_id = $1 AND user_id = $2', [team.id, analyst.user.id]);
    expect(rows).toEqual([{ role: 'analyst' }]);
    const { rows: audit } = await pool.query("SELECT detail FROM audit_events WHERE action = 'invitation.accept' AND actor_id = $1", [analyst.user.id]);
    expect(audit[0].detail).toEqual({ role: 'analyst', invitedAs: 'lead', keptRole: true });
  });
});

describe('only a lead changes roles in their team, never to operator', () => {
  it('refuses role=operator and role=admin as a membership change and as an invitation, and sets no operator flag', async () => {
    const { team } = await createTeam();
    const lead = await createMember(team.id, 'lead');
    const analyst = await createMember(team.id, 'analyst');
    const leadClient = await signedIn(lead);
    for (const role of ['operator', 'admin']) {
      const change = await leadClient.post(`/teams/${team.id}/membership`, { intent: 'role', userId: analyst.user.id, role });
      expect(change.status).toBe(303);
      expect(decodeURIComponent(change.headers.get('location')!)).toContain('problem=');
      const invite = await leadClient.post(`/teams/${team.id}/members`, { email: `${unique(role)}@fixture.example`, role });
      expect(invite.status).toBe(400);
      expect(await invite.text()).toContain('Please correct the marked fields. Nothing was changed.');
    }
    const { rows } = await pool.query('SELECT m.role, u.is_operator FROM memberships m JOIN users u ON u.id = m.user_id WHERE m.team_id = $1 ORDER BY m.role::text', [team.id]);
    expect(rows).toEqual([{ role: 'analyst', is_operator: false }, { role: 'lead', is_operator: false }]);
    const { rows: inv } = await pool.query('SELECT count(*)::int AS n FROM invitations WHERE team_id = $1', [team.id]);
    expect(inv[0].n).toBe(0);
  });

  it('refuses a reviewer and an operator who is not a member when they try to change roles', async () => {
    const { team } = await createTeam();
    const reviewer = await createMember(team.id, 'reviewer');
    const analyst = await createMember(team.id, 'analyst');
    const operator = await createOperator();
    const byReviewer = await (await signedIn(reviewer)).post(`/teams/${team.id}/membership`, { intent: 'role', userId: analyst.user.id, role: 'lead' });
    expect(byReviewer.status).toBe(403);
    const byOperator = await (await signedIn(operator)).post(`/teams/${team.id}/membership`, { intent: 'role', userId: analyst.user.id, role: 'lead' });
    expect(byOperator.status).toBe(404);
    const { rows } = await pool.query('SELECT role FROM memberships WHERE team_id = $1 AND user_id = $2', [team.id, analyst.user.id]);
    expect(rows).toEqual([{ role: 'analyst' }]);
  });
});
