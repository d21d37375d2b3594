import { createHash } from 'node:crypto';
import { afterAll, describe, expect, it } from 'vitest';
import { Client, pool } from '../helpers/app';
import { DEMO_PEOPLE } from '../../src/db/seed';

const lead = DEMO_PEOPLE.find((p) => p.role === 'lead')!;
/** The table keeps SHA-256(cookie token), never the token. */
const rowId = (token: string) => createHash('sha256').update(token).digest('hex');

afterAll(() => pool.end());

describe('sign-in against the running app and real PostgreSQL', () => {
  it('signs in with the right password: a session row and an HttpOnly, SameSite=Lax cookie', async () => {
    const client = new Client();
    const response = await client.signIn(lead.email, lead.password);
    expect(response.status).toBe(302);
    expect(response.headers.get('location')).toBe('/');
    const cookie = client.lastSetCookie.find((c) => c.startsWith('tidemark_session='))!;
    expect(cookie).toMatch(/HttpOnly/i);
    expect(cookie).toMatch(/SameSite=Lax/i);
    // Local development over http on loopback: no Secure flag, or the browser would drop the cookie.
    expect(cookie).not.toMatch(/;\s*Secure/i);
    const me = await client.request('/api/me');
    expect(me.status).toBe(200);
    const body = await me.json();
    expect(body.user.email).toBe(lead.email);
    expect(body.teams[0].role).toBe('lead');
    const { rows } = await pool.query('SELECT count(*)::int AS n FROM sessions s JOIN users u ON u.id = s.user_id WHERE u.email = $1', [lead.email]);
    expect(rows[0].n).toBeGreaterThan(0);
  });

  it('stores passwords as argon2id hashes', async () => {
    const { rows } = await pool.query('SELECT password_hash FROM users WHERE email = $1', [lead.email]);
    expect(rows[0].password_hash).toMatch(/^\$argon2id\$/);
  });

  it('refuses a wrong password with a message in the page and no session', async () => {
    const client = new Client();
    const response = await client.signIn(lead.email, 'not-the-password');
    expect(response.status).toBe(400);
    expect(await response.text()).toContain('That e-mail and password do not match an account.');
    expect(client.cookies.has('tidemark_session')).toBe(false);
  });

  it('gives an unknown e-mail the same answer as a wrong password', async () => {
    const client = new Client();
    const response = await client.signIn('nobody@nowhere.example', 'whatever-password');
    expect(response.status).toBe(400);
    expect(await response.text()).toContain('That e-mail and password do not match an account.');
  });

  it('answers a malformed form post with a clear message', async () => {
    const client = new Client();
    const json = await client.request('/sign-in', { method: 'POST', json: { email: lead.email } });
    // Astro's origin check only guards form content types; our page still refuses what it cannot read.
    expect(json.status).toBe(400);
    expect(await json.text()).toContain('The form could not be read');
    const missing = await client.post('/sign-in', { email: 'not-an-address' });
    expect(missing.status).toBe(400);
    const page = await missing.text();
    expect(page).toContain('Enter a valid e-mail address.');
    expect(page).toContain('Enter your password.');
  });

  it('refuses a cross-site form post (origin check)', async () => {
    const client = new Client();
    const response = await client.post('/sign-in', { email: lead.email, password: lead.password }, { origin: 'http://evil.example' });
    expect(response.status).toBe(403);
    expect(client.cookies.has('tidemark_session')).toBe(false);
  });

  it('treats an expired session as signed out and deletes it', async () => {
    const client = new Client();
    await client.signIn(lead.email, lead.password);
    const sessionId = rowId(client.cookies.get('tidemark_session')!);
    expect((await client.request('/api/me')).status).toBe(200);
    await pool.query("UPDATE sessions SET expires_at = now() - interval '1 minute' WHERE id = $1", [sessionId]);
    const after = await client.request('/api/me');
    expect(after.status).toBe(401);
    expect((await after.json()).error.code).toBe('unauthenticated');
    const { rows } = await pool.query('SELECT count(*)::int AS n FROM sessions WHERE id = $1', [sessionId]);
    expect(rows[0].n).toBe(0);
    const page = await client.request('/admin');
    expect(page.status).toBe(302);
    expect(page.headers.get('location')).toMatch(/^\/sign-in/);
  });

  it('signs out: the session row is gone and the cookie blanked', async () => {
    const client = new Client();
    await client.signIn(lead.email, lead.password);
    const sessionId = rowId(client.cookies.get('tidemark_session')!);
    const out = await client.post('/sign-out', {});
    expect(out.status).toBe(303);
    expect(client.cookies.has('tidemark_session')).toBe(false);
    const { rows } = await pool.query('SELECT count(*)::int AS n FROM sessions WHERE id = $1', [sessionId]);
    expect(rows[0].n).toBe(0);
  });

  it('follows ?next= only within the site', async () => {
    const inside = new Client();
    const ok = await inside.request('/sign-in?next=%2Fadmin', { method: 'POST', form: { email: lead.email, password: lead.password } });
    expect(ok.headers.get('location')).toBe('/admin');
    const outside = new Client();
    const refused = await outside.request('/sign-in?next=%2F%5Cevil.example', { method: 'POST', form: { email: lead.email, password: lead.password } });
    expect(refused.status).toBe(302);
    expect(refused.headers.get('location')).toBe('/');
  });

  it('shows the dev mailbox to this machine while the mail fake runs', async () => {
    const page = await new Client().request('/dev/mailbox');
    expect(page.status).toBe(200);
    expect(await page.text()).toContain('Mailbox');
  });
});
