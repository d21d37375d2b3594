import { afterAll, describe, expect, it } from 'vitest';
import { Client, latestMailId, linkIn, pool, unique, waitForMail } from '../helpers/app';
import { createMember, createTeam } from '../helpers/fixtures';
import { DEMO_PEOPLE } from '../../src/db/seed';

const lead = DEMO_PEOPLE.find((p) => p.role === 'lead')!;

afterAll(() => pool.end());

async function demoTeamId(client: Client): Promise<string> {
  return (await (await client.request('/api/me')).json()).teams[0].id;
}

describe('invitations through the mail fake', () => {
  it('a lead invites by e-mail; the invitee follows the mailed link, sets a password and joins with that role', async () => {
    const leadClient = new Client();
    await leadClient.signIn(lead.email, lead.password);
    const teamId = await demoTeamId(leadClient);
    const email = `${unique('invitee')}@saltmarsh.example`;
    const since = await latestMailId();
    const sent = await leadClient.post(`/teams/${teamId}/members`, { email, role: 'reviewer' });
    expect(sent.status).toBe(200);
    expect(await sent.text()).toContain(`Invitation sent to ${email}`);
    const mail = await waitForMail(email, since);
    expect(mail.subject).toContain('Saltmarsh Rhythms Lab');
    const path = linkIn(mail.text, '/invitations/');

    const invitee = new Client();
    const page = await invitee.request(path);
    expect(page.status).toBe(200);
    expect(await page.text()).toContain('reviewer');

    // Bad input first: mismatched passwords change nothing and the link stays valid.
    const mismatch = await invitee.post(path, { displayName: 'New Reviewer', password: 'a-long-password', confirm: 'another-password' });
    expect(mismatch.status).toBe(400);
    expect(await mismatch.text()).toContain('The two passwords differ.');
    const { rows: none } = await pool.query('SELECT count(*)::int AS n FROM users WHERE email = $1', [email]);
    expect(none[0].n).toBe(0);

    const accepted = await invitee.post(path, { displayName: 'New Reviewer', password: 'a-long-password', confirm: 'a-long-password' });
    expect(accepted.status).toBe(303);
    expect(accepted.headers.get('location')).toBe(`/teams/${teamId}`);
    const me = await (await invitee.request('/api/me')).json();
    expect(me.teams).toEqual([{ id: teamId, name: 'Saltmarsh Rhythms Lab', role: 'reviewer' }]);

    // The same link a second time is refused.
    const again = await new Client().request(path);
    expect(again.status).toBe(410);
    expect(await again.text()).toContain('already accepted');
    const reuse = await new Client().post(path, { displayName: 'Someone', password: 'b-long-password', confirm: 'b-long-password' });
    expect(reuse.status).toBe(410);

    const signIn = await new Client().signIn(email, 'a-long-password');
    expect(signIn.status).toBe(302);
    const { rows: audit } = await pool.query("SELECT action FROM audit_events WHERE action LIKE 'invitation.%' AND detail->>'email' = $1 OR (action = 'invitation.accept' AND actor_id = (SELECT id FROM users WHERE email = $1))", [email]);
    expect(audit.map((r) => r.action).sort()).toEqual(['invitation.accept', 'invitation.create']);
  });

  it('refuses an expired invitation', async () => {
    const leadClient = new Client();
    await leadClient.signIn(lead.email, lead.password);
    const teamId = await demoTeamId(leadClient);
    const email = `${unique('late')}@saltmarsh.example`;
    const since = await latestMailId();
    await leadClient.post(`/teams/${teamId}/members`, { email, role: 'analyst' });
    const path = linkIn((await waitForMail(email, since)).text, '/invitations/');
    await pool.query("UPDATE invitations SET expires_at = now() - interval '1 second' WHERE email = $1", [email]);
    const page = await new Client().request(path);
    expect(page.status).toBe(410);
    expect(await page.text()).toContain('This invitation has expired');
    const post = await new Client().post(path, { displayName: 'Late', password: 'a-long-password', confirm: 'a-long-password' });
    expect(post.status).toBe(410);
    const { rows } = await pool.query('SELECT count(*)::int AS n FROM users WHERE email = $1', [email]);
    expect(rows[0].n).toBe(0);
  });

  it('refuses an invitation from an analyst, and an unknown token', async () => {
    const { team } = await createTeam();
    const analyst = await createMember(team.id, 'analyst');
    const client = new Client();
    await client.signIn(analyst.email, analyst.password);
    const response = await client.post(`/teams/${team.id}/members`, { email: 'x@fixture.example', role: 'analyst' });
    expect(response.status).toBe(403);
    const { rows } = await pool.query('SELECT count(*)::int AS n FROM invitations WHERE email = $1', ['x@fixture.example']);
    expect(rows[0].n).toBe(0);
    expect((await new Client().request('/invitations/not-a-real-token')).status).toBe(410);
  });
});

describe('password reset round trip through the mail fake', () => {
  it('mails a link, sets the new password once, and answers unknown addresses the same way', async () => {
    const { team } = await createTeam();
    const member = await createMember(team.id, 'analyst', 'original-password');
    const since = await latestMailId();

    const known = await new Client().post('/forgot-password', { email: member.email });
    const unknown = await new Client().post('/forgot-password', { email: `${unique('ghost')}@fixture.example` });
    expect(known.status).toBe(200);
    expect(unknown.status).toBe(200);
    const knownText = await known.text();
    const unknownText = await unknown.text();
    const notice = (html: string) => /data-testid="reset-sent">([^<]*)</.exec(html)?.[1];
    expect(notice(knownText)).toBeTruthy();
    expect(notice(knownText)).toBe(notice(unknownText));

    const mail = await waitForMail(member.email, since);
    const path = linkIn(mail.text, '/reset-password/');
    expect((await new Client().request(path)).status).toBe(200);

    const short = await new Client().post(path, { password: 'short', confirm: 'short' });
    expect(short.status).toBe(400);
    expect(await short.text()).toContain('Use at least 10 characters.');

    const done = await new Client().post(path, { password: 'brand-new-password', confirm: 'brand-new-password' });
    expect(done.status).toBe(303);
    expect(done.headers.get('location')).toBe('/sign-in?notice=password-reset');

    expect((await new Client().signIn(member.email, 'original-password')).status).toBe(400);
    expect((await new Client().signIn(member.email, 'brand-new-password')).status).toBe(302);

    const reused = await new Client().post(path, { password: 'third-password-x', confirm: 'third-password-x' });
    expect(reused.status).toBe(410);
    expect(await reused.text()).toContain('already used');
    expect((await new Client().signIn(member.email, 'brand-new-password')).status).toBe(302);
    const { rows } = await pool.query('SELECT count(*)::int AS n FROM mail_messages WHERE to_addresses ILIKE $1', ['%ghost%']);
    expect(rows[0].n).toBe(0);
  });

  it('refuses an expired reset link and keeps the old password', async () => {
    const { team } = await createTeam();
    const member = await createMember(team.id, 'reviewer', 'keep-this-password');
    const since = await latestMailId();
    await new Client().post('/forgot-password', { email: member.email });
    const path = linkIn((await waitForMail(member.email, since)).text, '/reset-password/');
    await pool.query("UPDATE password_reset_tokens SET expires_at = now() - interval '1 second' WHERE user_id = $1", [member.user.id]);
    const response = await new Client().post(path, { password: 'another-password', confirm: 'another-password' });
    expect(response.status).toBe(410);
    expect(await response.text()).toContain('This reset link has expired');
    expect((await new Client().signIn(member.email, 'keep-this-password')).status).toBe(302);
  });
});
