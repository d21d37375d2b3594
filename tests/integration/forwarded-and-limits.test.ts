// Client addresses, forged forwarded headers and the PostgreSQL rate limits, against real PostgreSQL and the built
// app. A second instance runs behind a "proxy" (this test, on 127.0.0.1, configured as trusted), so the test can
// play clients from documentation addresses (RFC 5737: 198.51.100.0/24, 203.0.113.0/24).
import http from 'node:http';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { Client, appUrl, pool, unique } from '../helpers/app';
import { createMember, createTeam } from '../helpers/fixtures';
import { createInvitation } from '../../src/db/queries/invitations';
import { startInstance, type Instance } from '../helpers/instance';

let proxied: Instance;

beforeAll(async () => {
  proxied = await startInstance({ TIDEMARK_TRUSTED_PROXIES: '127.0.0.1' });
});
afterAll(async () => {
  await proxied?.stop();
  await pool.end();
});

/** A client behind the trusted proxy: every request carries `X-Forwarded-For: <chain>`. */
function behindProxy(chain: string): Client {
  const client = new Client(proxied.url);
  const request = client.request.bind(client);
  client.request = (path, init = {}) => request(path, { ...init, headers: { ...(init.headers as Record<string, string>), 'x-forwarded-for': chain } });
  return client;
}

async function auditAddresses(action: string, targetId: string): Promise<string[]> {
  const { rows } = await pool.query('SELECT detail->>\'address\' AS address FROM audit_events WHERE action = $1 AND target_id = $2 ORDER BY id', [action, targetId]);
  return rows.map((r) => r.address);
}

describe('client address', () => {
  it('ignores X-Forwarded-For from a peer that is not a configured proxy (the address is the socket\'s)', async () => {
    const email = `${unique('nobody')}@fixture.example`;
    const forged = new Client();
    const response = await forged.request('/sign-in', { method: 'POST', form: { email, password: 'wrong-password-1' }, headers: { 'x-forwarded-for': '198.51.100.77' } });
    expect(response.status).toBe(400);
    expect(await auditAddresses('session.signInFailed', `email:${email}`)).toEqual(['127.0.0.1']);
  });

  it('uses the forwarded address behind a configured proxy, read from the right past the proxies', async () => {
    const email = `${unique('nobody')}@fixture.example`;
    // The client itself sent "127.0.0.1"; the proxy appended the address it saw.
    const response = await behindProxy('127.0.0.1, 198.51.100.9').request('/sign-in', { method: 'POST', form: { email, password: 'wrong-password-1' } });
    expect(response.status).toBe(400);
    expect(await auditAddresses('session.signInFailed', `email:${email}`)).toEqual(['198.51.100.9']);
  });

  it('keeps the dev mailbox from a forged loopback address, directly or through the proxy', async () => {
    // Through the trusted proxy, a client claiming to be 127.0.0.1 is still 198.51.100.9.
    const viaProxy = await behindProxy('127.0.0.1, 198.51.100.9').request('/dev/mailbox');
    expect(viaProxy.status).toBe(404);
    expect(await viaProxy.text()).not.toContain('reset-password');
    // A peer that is not a configured proxy cannot make itself loopback either (checked on a non-proxied instance
    // reached from loopback: the mailbox shows, and the header is simply not what decides).
    const direct = await new Client().request('/dev/mailbox', { headers: { 'x-forwarded-for': '198.51.100.9' } });
    expect(direct.status).toBe(200);
  });
});

describe('rate limits kept in PostgreSQL', () => {
  it('locks an account after ten wrong passwords from eleven addresses, refuses even the right password, audits each, and lets it in when the wait ends', async () => {
    const { team } = await createTeam();
    const member = await createMember(team.id, 'analyst');
    const results: number[] = [];
    for (let i = 1; i <= 11; i++) {
      const r = await behindProxy(`198.51.100.${100 + i}`).request('/sign-in', { method: 'POST', form: { email: member.email, password: `wrong-${i}-password` } });
      results.push(r.status);
      if (i === 11) expect(await r.text()).toMatch(/Too many failed sign-ins\. Wait 1[45] minutes before trying again/);
    }
    expect(results).toEqual([400, 400, 400, 400, 400, 400, 400, 400, 400, 429, 429]);

    const right = await behindProxy('198.51.100.200').request('/sign-in', { method: 'POST', form: { email: member.email, password: member.password } });
    expect(right.status).toBe(429);
    expect(right.headers.getSetCookie().some((c) => c.startsWith('tidemark_session=') && !/Max-Age=0/i.test(c))).toBe(false);

    const { rows: audit } = await pool.query('SELECT action, detail FROM audit_events WHERE target_id = $1 AND action LIKE \'session.signIn%\' ORDER BY id', [member.user.id]);
    expect(audit.map((a) => a.action)).toEqual([...Array(10).fill('session.signInFailed'), 'session.signInRefused', 'session.signInRefused']);
    expect(new Set(audit.slice(0, 10).map((a) => a.detail.address)).size).toBe(10);

    // The wait ends (the lock is moved into the past, as the clock would): the right password works again.
    await pool.query("UPDATE throttles SET locked_until = now() - interval '1 second', window_started_at = now() - interval '16 minutes' WHERE bucket = 'sign-in:account'");
    const after = await behindProxy('198.51.100.201').request('/sign-in', { method: 'POST', form: { email: member.email, password: member.password } });
    expect(after.status).toBe(302);
  });

  it('answers an address without an account exactly like one with an account once locked', async () => {
    const { team } = await createTeam();
    const member = await createMember(team.id, 'reviewer');
    const ghost = `${unique('ghost')}@fixture.example`;
    const lastAnswer = async (email: string, net: number) => {
      let text = '';
      let status = 0;
      for (let i = 0; i < 10; i++) {
        const r = await behindProxy(`203.0.113.${net + i}`).request('/sign-in', { method: 'POST', form: { email, password: 'wrong-password-x' } });
        status = r.status;
        text = await r.text();
      }
      return { status, message: /Too many failed sign-ins[^<]*/.exec(text)?.[0] };
    };
    const real = await lastAnswer(member.email, 10);
    const none = await lastAnswer(ghost, 30);
    expect(real.status).toBe(429);
    expect(none).toEqual(real);
  });

  it('a forged X-Forwarded-For does not give a fresh address allowance: the limit follows the real client', async () => {
    // 50 failures from one client (the per-address allowance), each with a different forged first hop.
    for (let i = 0; i < 50; i++) {
      await behindProxy(`10.0.${i}.1, 198.51.100.50`).request('/sign-in', { method: 'POST', form: { email: `${unique('spray')}@fixture.example`, password: 'wrong-password-y' } });
    }
    const next = await behindProxy('10.9.9.9, 198.51.100.50').request('/sign-in', { method: 'POST', form: { email: `${unique('spray')}@fixture.example`, password: 'wrong-password-y' } });
    expect(next.status).toBe(429);
    // Another client behind the same proxy is not affected.
    const other = await behindProxy('198.51.100.51').request('/sign-in', { method: 'POST', form: { email: `${unique('spray')}@fixture.example`, password: 'wrong-password-y' } });
    expect(other.status).toBe(400);
  }, 120_000);

  it('limits password-reset requests per e-mail, with the same answer for unknown addresses', async () => {
    const ghost = `${unique('ghost')}@fixture.example`;
    const statuses: number[] = [];
    let text = '';
    for (let i = 0; i < 4; i++) {
      const r = await behindProxy(`203.0.113.${60 + i}`).request('/forgot-password', { method: 'POST', form: { email: ghost } });
      statuses.push(r.status);
      text = await r.text();
    }
    expect(statuses).toEqual([200, 200, 200, 429]);
    expect(text).toMatch(/Too many reset requests\. Wait (59|60) minutes/);
  });
});

describe('invitation attempts are limited per token', () => {
  it('locks an invitation after five wrong current passwords of the existing account, even from new addresses, and keeps its role untouched', async () => {
    const home = await createTeam();
    const other = await createTeam();
    const member = await createMember(home.team.id, 'reviewer');
    const lead = await createMember(other.team.id, 'lead');
    const { token } = await createInvitation(other.team.id, lead.user.id, { email: member.email, role: 'analyst' });
    const statuses: number[] = [];
    for (let i = 0; i < 6; i++) {
      const r = await behindProxy(`203.0.113.${120 + i}`).request(`/invitations/${token}`, {
        method: 'POST',
        form: { displayName: 'Someone', password: `not-the-password-${i}`, confirm: `not-the-password-${i}` },
      });
      statuses.push(r.status);
      if (i === 5) expect(await r.text()).toMatch(/Too many attempts with this invitation\. Wait (59|60) minutes/);
    }
    expect(statuses).toEqual([400, 400, 400, 400, 400, 429]);
    // Even the right password waits now; nothing was joined.
    const right = await behindProxy('203.0.113.130').request(`/invitations/${token}`, { method: 'POST', form: { displayName: 'x', password: member.password, confirm: member.password } });
    expect(right.status).toBe(429);
    const { rows } = await pool.query('SELECT count(*)::int AS n FROM memberships WHERE user_id = $1 AND team_id = $2', [member.user.id, other.team.id]);
    expect(rows[0].n).toBe(0);
  });
});

describe('request bodies are capped before they are read', () => {
  it('refuses a declared Content-Length over the cap without reading the body', async () => {
    const status = await new Promise<number>((resolve, reject) => {
      const req = http.request(`${appUrl}/sign-in`, { method: 'POST', headers: { 'content-type': 'application/x-www-form-urlencoded', 'content-length': String(50 * 1024 * 1024), origin: appUrl } });
      req.on('response', (res) => {
        res.resume();
        resolve(res.statusCode ?? 0);
      });
      req.on('error', reject);
      req.write('email=a'); // 50 MiB announced, 7 bytes sent: the answer comes anyway
    });
    expect(status).toBe(413);
  });

  it('counts a chunked body while it streams and stops at the route\'s cap (JSON 4 KiB, forms 16 KiB)', async () => {
    const client = new Client();
    const { team, study } = await createTeam();
    const lead = await createMember(team.id, 'analyst');
    await client.signIn(lead.email, lead.password);
    const cookie = [...client.cookies].map(([k, v]) => `${k}=${v}`).join('; ');
    const send = (path: string, type: string, chunks: number, chunk: string) =>
      new Promise<{ status: number; body: string }>((resolve, reject) => {
        const req = http.request(`${appUrl}${path}`, { method: 'POST', headers: { 'content-type': type, 'transfer-encoding': 'chunked', origin: appUrl, cookie } });
        req.on('response', (res) => {
          let body = '';
          res.on('data', (c) => (body += c));
          res.on('end', () => resolve({ status: res.statusCode ?? 0, body }));
        });
        req.on('error', (e) => (String(e).includes('EPIPE') || String(e).includes('ECONNRESET') ? undefined : reject(e)));
        for (let i = 0; i < chunks; i++) req.write(chunk);
        req.end();
      });
    const json = await send(`/api/studies/${study.id}/analysis-sessions`, 'application/json', 64, 'x'.repeat(1024));
    expect(json.status).toBe(413);
    expect(JSON.parse(json.body).error.message).toBe('The body is larger than 4096 bytes.');
    const form = await send('/sign-in', 'application/x-www-form-urlencoded', 40, 'a'.repeat(1024));
    expect(form.status).toBe(413);
    expect(form.body).toContain('larger than 16384 bytes');
  });

  it('refuses multipart where no upload is meant', async () => {
    const boundary = 'tidemark-test';
    const body = `--${boundary}\r\nContent-Disposition: form-data; name="email"\r\n\r\nx@y.example\r\n--${boundary}--\r\n`;
    const response = await fetch(`${appUrl}/sign-in`, { method: 'POST', body, headers: { 'content-type': `multipart/form-data; boundary=${boundary}`, origin: appUrl } });
    expect(response.status).toBe(400);
    expect(await response.text()).toContain('unexpected content type');
  });
});
